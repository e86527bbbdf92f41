// Fitting one rate law to one run: the straight line and the curve fit, on data already in SI.

import { finalCA, lineY, type Feed, type RateLaw } from "./rateLaws.ts";
import { measurementMap, signalMap, toCA, type AffineMap, type Measurement } from "./measurement.ts";
import { fitLine, type LineFit } from "./linearFit.ts";
import { fitNonlinear, type NonlinearFit } from "./nonlinearFit.ts";
import { checkCurvature, type Flag } from "./diagnostics.ts";
import { molPerLitrePer, secondsPer } from "./units.ts";
import type { FitRequest } from "./request.ts";

/** Run data in SI, as the engine works on it. */
export interface RunData {
  feed: Feed;
  measurement: Measurement;
  t: Float64Array;
  values: Float64Array;
  /** mol/L per request unit for concentration-valued measurements, else 1 */
  valueScale: number;
}

export interface LawFit {
  law: RateLaw;
  map: AffineMap;
  line: LineFit | null;
  lineRows: number[];
  beyondRows: number[];
  nonlinear: NonlinearFit;
}

/** Converts the request to SI. Concentration-valued measurements scale with the unit; others do not. */
export function toSI(request: FitRequest): RunData {
  const ts = secondsPer(request.units.time);
  const cs = molPerLitrePer(request.units.concentration);
  const { a, b } = request.reaction;
  const feed: Feed = { CA0: request.feed.CA0 * cs, CB0: (request.feed.CB0 ?? 0) * cs, nu: b / a };
  const kind = request.measurement.kind;
  const valueScale = kind === "concentrationA" || kind === "concentrationB" ? cs : 1;
  const n = request.points.length;
  const t = new Float64Array(n);
  const values = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = request.points[i][0] * ts;
    values[i] = request.points[i][1] * valueScale;
  }
  return { feed, measurement: request.measurement, t, values, valueScale };
}

// For the other laws in the order comparison the straight line only seeds the nonlinear fit,
// so on long records it is drawn through every stride-th point.
const SEED_LINE_POINTS = 2000;

/** Straight-line and nonlinear fits of one rate law (`seedOnly`: the line just seeds the curve fit). */
export function fitLaw(law: RateLaw, data: RunData, throughOrigin: boolean, seedOnly = false): LawFit {
  const { feed, measurement, t, values } = data;
  const n = t.length;
  const stride = seedOnly ? Math.max(1, Math.floor(n / SEED_LINE_POINTS)) : 1;
  let nonlinear: NonlinearFit | null = null;
  let map: AffineMap;
  if (measurement.kind === "signal" && measurement.Sinf === undefined) {
    // Sinf unknown: the nonlinear fit finds it, and the straight line then uses it.
    nonlinear = fitNonlinear({ law, feed, t, values, S0: measurement.S0 });
    map = signalMap(measurement.S0, nonlinear.Sinf!.value, feed);
  } else {
    map = measurementMap(measurement, feed);
  }
  const end = finalCA(feed);
  const lineRows: number[] = [];
  const beyondRows: number[] = [];
  const lineT = new Float64Array(n);
  const lineYs = new Float64Array(n);
  let used = 0;
  for (let i = 0; i < n; i += stride) {
    const CA = toCA(map, values[i]);
    const y = lineY(law, feed, CA);
    if (CA <= end || !Number.isFinite(y)) {
      beyondRows.push(i);
      continue;
    }
    lineRows.push(i);
    lineT[used] = t[i];
    lineYs[used] = y;
    used++;
  }
  const line = used >= 2 ? fitLine(lineT.subarray(0, used), lineYs.subarray(0, used), throughOrigin) : null;
  if (!nonlinear) nonlinear = fitNonlinear({ law, feed, t, values, map }, line?.slope);
  return { law, map, line, lineRows, beyondRows, nonlinear };
}

/** Row indices in time order; the identity when the rows already are (the usual case). */
export function timeOrder(t: Float64Array): ArrayLike<number> {
  const n = t.length;
  const order = new Int32Array(n);
  let sorted = true;
  for (let i = 0; i < n; i++) {
    order[i] = i;
    if (i > 0 && t[i] < t[i - 1]) sorted = false;
  }
  if (!sorted) order.sort((i, j) => t[i] - t[j] || i - j);
  return order;
}

export function curvatureFlag(fit: LawFit, order: ArrayLike<number>): Flag | null {
  const r = fit.nonlinear.residuals;
  const inOrder = new Float64Array(order.length);
  for (let i = 0; i < order.length; i++) inOrder[i] = r[order[i]];
  return checkCurvature(inOrder, order);
}

