// One fit request -> one result: converts units at the edge, fits the requested rate law
// (straight line and nonlinear), compares the other laws, runs the diagnostics and the
// reference check. Shared by the command line, API routes and the browser preview.

import {
  RATE_LAWS,
  concentrationA,
  finalCA,
  lawFromOrders,
  limitingReagent,
  lineY,
  maxReactedA,
  modelName,
  rateConstantUnit,
  textbookLine,
  type Feed,
  type ModelName,
  type RateLaw,
} from "./rateLaws.ts";
import { fromCA, measurementMap, signalMap, toCA, type AffineMap, type Measurement } from "./measurement.ts";
import { fitLine, type LineFit } from "./linearFit.ts";
import { fitNonlinear, type NonlinearFit } from "./nonlinearFit.ts";
import { rateConstantAt } from "./arrhenius.ts";
import {
  checkBeyondAsymptote,
  checkConverged,
  checkCurvature,
  checkFewPoints,
  checkLowConversion,
  checkOrderMismatch,
  checkStraightLineBias,
  checkTimeOrder,
  checkUnitSlip,
  type Flag,
} from "./diagnostics.ts";
import { celsiusToKelvin, molPerLitrePer, secondsPer, type ConcentrationUnit, type TimeUnit } from "./units.ts";
import type { FitRequest } from "./request.ts";

/** Marking tolerance when the request gives none: published k scatter 20-30 % (common practice, no source). */
export const DEFAULT_TOLERANCE_PCT = 20;
const CURVE_POINTS = 61;

export interface LawComparison {
  model: ModelName;
  k: number;
  kUnit: "1/s" | "L/(mol*s)";
  kStdErr: number;
  /** residual sum of squares of the nonlinear fit, in the measured quantity's units squared */
  sse: number;
  /** residual standard deviation of the nonlinear fit, measured units */
  residualStdDev: number;
  /** whether the runs test finds systematic bending for this law */
  curved: boolean;
}

/**
 * The contract fields come first (model ... reference); the rest are extras.
 * Numbers that cannot be computed are NaN (null once serialised to JSON).
 */
export interface FitResult {
  model: ModelName;
  /** k from the straight-line fit, per second (1/s or L/(mol s)) */
  k: number;
  kUnit: "1/s" | "L/(mol*s)";
  kStdErr: number;
  kCI95: [number, number];
  r2: number;
  /** points used in the straight-line fit */
  n: number;
  nonlinear: {
    k: number;
    kStdErr: number;
    kCI95: [number, number];
    /** final signal fitted as a second parameter (signal units), when the request left Sinf out */
    Sinf?: { value: number; stdErr: number; ci95: [number, number] };
    residualStdDev: number;
    /** measured value minus fitted value per row, in the request's units */
    residuals: number[];
    iterations: number;
    converged: boolean;
  };
  flags: Flag[];
  reference?: {
    kAtT: number;
    deviationPct: number;
    withinTolerance: boolean;
    tolerancePct: number;
    temperatureK?: number;
  };
  line: {
    /** the textbook y plotted against t, and its slope = slopeFactor * k */
    form: string;
    slopeFactor: number;
    /** intercept of y = k t scaled form (same units as k t) */
    intercept: number;
    interceptStdErr: number;
    /** start-time offset the intercept implies (intercept / k), in the request's time unit */
    timeOffset: number;
    throughOrigin: boolean;
    /** rows used, and y - fitted y for each of them (scaled form, k t units) */
    rows: number[];
    residuals: number[];
  };
  orderComparison?: { best: ModelName; laws: LawComparison[] };
  limitingReagent: "A" | "B";
  /** long-time CA set by stoichiometry, request's concentration unit */
  finalCA: number;
  /** share of the limiting reagent reacted by the last time, from the nonlinear fit */
  fractionReacted: number;
  /** predicted CA and measured value from the nonlinear fit, request's units */
  curve: { t: number[]; CA: number[]; value: number[] };
  units: { time: TimeUnit; concentration: ConcentrationUnit };
}

/** Run data in SI, as the engine works on it. */
interface RunData {
  feed: Feed;
  measurement: Measurement;
  t: Float64Array;
  values: Float64Array;
}

interface LawFit {
  law: RateLaw;
  map: AffineMap;
  line: LineFit | null;
  lineRows: number[];
  beyondRows: number[];
  nonlinear: NonlinearFit;
}

/** Converts the request to SI. Concentration-valued measurements scale with the unit; others do not. */
function toSI(request: FitRequest): RunData {
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
  return { feed, measurement: request.measurement, t, values };
}

// For the other laws in the order comparison the straight line only seeds the nonlinear fit,
// so on long records it is drawn through every stride-th point.
const SEED_LINE_POINTS = 2000;

/** Straight-line and nonlinear fits of one rate law (`seedOnly`: the line just seeds the curve fit). */
function fitLaw(law: RateLaw, data: RunData, throughOrigin: boolean, seedOnly = false): LawFit {
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
function timeOrder(t: Float64Array): ArrayLike<number> {
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

function curvatureFlag(fit: LawFit, order: ArrayLike<number>): Flag | null {
  const r = fit.nonlinear.residuals;
  const inOrder = new Float64Array(order.length);
  for (let i = 0; i < order.length; i++) inOrder[i] = r[order[i]];
  return checkCurvature(inOrder, order);
}

export function runFit(request: FitRequest): FitResult {
  const data = toSI(request);
  const { feed } = data;
  const law = lawFromOrders(request.reaction.orderA, request.reaction.orderB);
  if (!law) throw new Error("unsupported orders: validate the request first");
  const throughOrigin = request.options?.lineThroughOrigin ?? false;
  const ts = secondsPer(request.units.time);
  const cs = molPerLitrePer(request.units.concentration);
  const valueScale = data.measurement.kind === "concentrationA" || data.measurement.kind === "concentrationB" ? cs : 1;
  const n = data.t.length;
  const order = timeOrder(data.t);
  const lastRow = order[n - 1];

  const fit = fitLaw(law, data, throughOrigin);
  const { line, nonlinear } = fit;
  const model = modelName(law, feed);
  const kUnit = rateConstantUnit(law);
  const k = line ? line.slope : NaN;

  const flags: Flag[] = [];
  const push = (f: Flag | null) => {
    if (f) flags.push(f);
  };
  push(checkFewPoints(n));
  push(checkTimeOrder(data.t));
  const end = finalCA(feed);
  push(checkBeyondAsymptote(fit.beyondRows, `CA = ${formatNumber(end / cs)} ${request.units.concentration}`));
  const tLast = data.t[lastRow];
  const fractionReacted = (feed.CA0 - concentrationA(law, feed, nonlinear.k, tLast)) / maxReactedA(feed);
  push(checkLowConversion(fractionReacted, limitingReagent(feed), lastRow));
  const curvature = curvatureFlag(fit, order);
  push(curvature);
  push(checkConverged(nonlinear.converged));
  if (line) push(checkStraightLineBias(line.slope, line.slopeStdErr, nonlinear.k, nonlinear.kStdErr));

  let orderComparison: FitResult["orderComparison"];
  if (request.options?.compareOrders ?? true) {
    const laws: LawComparison[] = [];
    let best = { model, sse: nonlinear.sse };
    // the A-B law needs some B; without it only the A-only laws are compared
    const candidates = RATE_LAWS.filter((l) => l !== "second-order-AB" || feed.CB0 > 0);
    for (const other of candidates) {
      const f = other === law ? fit : fitLaw(other, data, throughOrigin, true);
      const entry: LawComparison = {
        model: modelName(other, feed),
        k: f.nonlinear.k,
        kUnit: rateConstantUnit(other),
        kStdErr: f.nonlinear.kStdErr,
        sse: f.nonlinear.sse / (valueScale * valueScale),
        residualStdDev: f.nonlinear.residualStdDev / valueScale,
        curved: other === law ? curvature !== null : curvatureFlag(f, order) !== null,
      };
      laws.push(entry);
      if (f.nonlinear.sse < best.sse) best = { model: entry.model, sse: f.nonlinear.sse };
    }
    orderComparison = { best: best.model, laws };
    push(checkOrderMismatch(n, model, nonlinear.sse, best.model, best.sse));
  }

  let reference: FitResult["reference"];
  if (request.reference) {
    const ref = request.reference;
    const tolerancePct = ref.tolerancePct ?? DEFAULT_TOLERANCE_PCT;
    const temperatureK = request.temperatureC === undefined ? undefined : celsiusToKelvin(request.temperatureC);
    const kAtT =
      ref.EaKJ === undefined || temperatureK === undefined || ref.TrefC === undefined
        ? ref.k
        : rateConstantAt(ref.k, celsiusToKelvin(ref.TrefC), ref.EaKJ * 1000, temperatureK);
    const deviationPct = ((k - kAtT) / kAtT) * 100;
    reference = { kAtT, deviationPct, withinTolerance: Math.abs(deviationPct) <= tolerancePct, tolerancePct, temperatureK };
    push(checkUnitSlip(k, kAtT));
  }

  const textbook = textbookLine(law, feed);
  let tMax = 0;
  for (const ti of data.t) tMax = Math.max(tMax, ti);
  const curve = { t: [] as number[], CA: [] as number[], value: [] as number[] };
  for (let i = 0; i < CURVE_POINTS; i++) {
    const ti = (tMax * i) / (CURVE_POINTS - 1);
    const c = concentrationA(law, feed, nonlinear.k, ti);
    curve.t.push(ti / ts);
    curve.CA.push(c / cs);
    curve.value.push(fromCA(fit.map, c) / valueScale);
  }

  return {
    model,
    k,
    kUnit,
    kStdErr: line ? line.slopeStdErr : NaN,
    kCI95: line ? line.slopeCI95 : [NaN, NaN],
    r2: line ? line.r2 : NaN,
    n: fit.lineRows.length,
    nonlinear: {
      k: nonlinear.k,
      kStdErr: nonlinear.kStdErr,
      kCI95: nonlinear.kCI95,
      Sinf: nonlinear.Sinf,
      residualStdDev: nonlinear.residualStdDev / valueScale,
      residuals: nonlinear.residuals.map((r) => r / valueScale),
      iterations: nonlinear.iterations,
      converged: nonlinear.converged,
    },
    flags,
    reference,
    line: {
      form: textbook.y,
      slopeFactor: textbook.factor,
      intercept: line ? line.intercept : NaN,
      interceptStdErr: line ? line.interceptStdErr : NaN,
      timeOffset: line ? line.intercept / line.slope / ts : NaN,
      throughOrigin,
      rows: fit.lineRows,
      residuals: line ? line.residuals : [],
    },
    orderComparison,
    limitingReagent: limitingReagent(feed),
    finalCA: end / cs,
    fractionReacted,
    curve,
    units: { ...request.units },
  };
}

function formatNumber(x: number): string {
  return Number(x.toPrecision(4)).toString();
}
