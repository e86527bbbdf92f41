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
/** a k within this many standard errors of the optimum leaves the SSE above its minimum by 0.3^2 sigma^2, a negligible AIC change */
export const COMPARISON_TOLERANCE = 0.3;

/**
 * Straight-line (unweighted) and nonlinear fits of one rate law (`seedOnly`: the line just seeds
 * the curve fit). `weights` (noise.ts) weight the curve fit; `kGuess` seeds it instead of the line.
 */
export function fitLaw(law: RateLaw, data: RunData, throughOrigin: boolean, seedOnly = false, weights?: ArrayLike<number>, kGuess?: number): LawFit {
  // a law fitted only for the comparison needs its SSE, not k to a ten-thousandth of its SE
  const tolerance = seedOnly ? COMPARISON_TOLERANCE : undefined;
  const { feed, measurement, t, values } = data;
  const n = t.length;
  const stride = seedOnly ? Math.max(1, Math.floor(n / SEED_LINE_POINTS)) : 1;
  let nonlinear: NonlinearFit | null = null;
  let map: AffineMap;
  if (measurement.kind === "signal" && measurement.Sinf === undefined) {
    // Sinf unknown: the nonlinear fit finds it, and the straight line then uses it.
    nonlinear = fitNonlinear({ law, feed, t, values, S0: measurement.S0, weights }, kGuess, tolerance);
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
  if (!nonlinear) nonlinear = fitNonlinear({ law, feed, t, values, map, weights }, kGuess ?? line?.slope, tolerance);
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


/** Curve fit on times shifted by t0 (the reaction had run t0 before the clock's zero). */
export function fitShifted(law: RateLaw, data: RunData, map: AffineMap | undefined, t0: number, weights: ArrayLike<number> | undefined, kGuess: number): NonlinearFit {
  const { feed, measurement, t, values } = data;
  const shifted = new Float64Array(t.length);
  for (let i = 0; i < t.length; i++) shifted[i] = t[i] + t0;
  if (map) return fitNonlinear({ law, feed, t: shifted, values, map, weights }, kGuess);
  return fitNonlinear({ law, feed, t: shifted, values, S0: (measurement as { S0: number }).S0, weights }, kGuess);
}

/**
 * Best start offset t0 in [0, tMax] for the curve fit (golden-section search on the weighted
 * SSE; a smooth one-dimensional minimum, Press et al., Numerical Recipes, 3rd ed., 10.2; from
 * memory). Long records are searched on evenly spaced rows, then refitted on all of them.
 */
export function searchStartOffset(law: RateLaw, data: RunData, map: AffineMap | undefined, weights: ArrayLike<number> | undefined, kGuess: number, tMax: number): { t0: number; fit: NonlinearFit } {
  const n = data.t.length;
  const stride = Math.max(1, Math.ceil(n / 400));
  const rows: number[] = [];
  for (let i = 0; i < n; i += stride) rows.push(i);
  const sample: RunData = stride === 1 ? data : { ...data, t: Float64Array.from(rows, (i) => data.t[i]), values: Float64Array.from(rows, (i) => data.values[i]) };
  const sampleWeights = weights && stride > 1 ? Float64Array.from(rows, (i) => weights[i]) : weights;
  let k = kGuess;
  const sse = (t0: number) => {
    const f = fitShifted(law, sample, map, t0, sampleWeights, k);
    if (f.converged && f.k > 0) k = f.k;
    return f.sse;
  };
  const phi = (Math.sqrt(5) - 1) / 2;
  let a = 0;
  let b = tMax;
  let c = b - phi * (b - a);
  let d = a + phi * (b - a);
  let fc = sse(c);
  let fd = sse(d);
  for (let it = 0; it < 30 && b - a > 1e-4 * tMax; it++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - phi * (b - a);
      fc = sse(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + phi * (b - a);
      fd = sse(d);
    }
  }
  let t0 = (a + b) / 2;
  if (sse(0) <= Math.min(fc, fd)) t0 = 0;
  return { t0, fit: fitShifted(law, data, map, t0, weights, k) };
}
