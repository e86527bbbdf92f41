// One fit request -> one result: converts units at the edge, fits the requested rate law
// (straight line and nonlinear), compares the other laws, runs the diagnostics and the
// reference check. Shared by the command line, API routes and the browser preview.

import {
  RATE_LAWS,
  concentrationA,
  finalCA,
  lawFromOrders,
  limitingReagent,
  maxReactedA,
  modelName,
  rateConstantUnit,
  textbookLine,
  type ModelName,
  type RateLaw,
} from "./rateLaws.ts";
import { fromCA } from "./measurement.ts";
import { rateConstantAt } from "./arrhenius.ts";
import {
  checkBeyondAsymptote,
  checkConverged,
  checkFewPoints,
  checkLowConversion,
  checkOrderMismatch,
  checkStraightLineBias,
  checkTimeOrder,
  checkUnitSlip,
  type Flag,
} from "./diagnostics.ts";
import { curvatureFlag, fitLaw, timeOrder, toSI, type LawFit, type RunData } from "./lawFit.ts";
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
  /**
   * Curve fits of every supported law on the same rows; on records longer than
   * COMPARISON_POINTS, on that many evenly spaced rows (`points` says how many).
   */
  orderComparison?: { best: ModelName; laws: LawComparison[]; points: number };
  limitingReagent: "A" | "B";
  /** long-time CA set by stoichiometry, request's concentration unit */
  finalCA: number;
  /** share of the limiting reagent reacted by the last time, from the nonlinear fit */
  fractionReacted: number;
  /** predicted CA and measured value from the nonlinear fit, request's units */
  curve: { t: number[]; CA: number[]; value: number[] };
  units: { time: TimeUnit; concentration: ConcentrationUnit };
}

export function runFit(request: FitRequest): FitResult {
  const data = toSI(request);
  const { feed } = data;
  const law = lawFromOrders(request.reaction.orderA, request.reaction.orderB);
  if (!law) throw new Error("unsupported orders: validate the request first");
  const throughOrigin = request.options?.lineThroughOrigin ?? false;
  const ts = secondsPer(request.units.time);
  const cs = molPerLitrePer(request.units.concentration);
  const n = data.t.length;
  const order = timeOrder(data.t);
  const lastRow = order[n - 1];

  const fit = fitLaw(law, data, throughOrigin);
  const { line, nonlinear } = fit;
  const model = modelName(law, feed);
  const k = line ? line.slope : NaN;

  const flags: Flag[] = [];
  const push = (f: Flag | null) => {
    if (f) flags.push(f);
  };
  push(checkFewPoints(n));
  push(checkTimeOrder(data.t));
  const end = finalCA(feed);
  push(checkBeyondAsymptote(fit.beyondRows, `CA = ${formatNumber(end / cs)} ${request.units.concentration}`));
  const fractionReacted = (feed.CA0 - concentrationA(law, feed, nonlinear.k, data.t[lastRow])) / maxReactedA(feed);
  push(checkLowConversion(fractionReacted, limitingReagent(feed), lastRow));
  const curvature = curvatureFlag(fit, order);
  push(curvature);
  push(checkConverged(nonlinear.converged));
  if (line) push(checkStraightLineBias(line.slope, line.slopeStdErr, nonlinear.k, nonlinear.kStdErr));

  let orderComparison: FitResult["orderComparison"];
  if (request.options?.compareOrders ?? true) {
    orderComparison = compareLaws(data, fit, curvature !== null, order, throughOrigin);
    const best = orderComparison.laws.find((l) => l.model === orderComparison!.best)!;
    const asked = orderComparison.laws.find((l) => l.model === model)!;
    push(checkOrderMismatch(n, model, asked.sse, best.model, best.sse));
  }

  let reference: FitResult["reference"];
  if (request.reference) {
    reference = referenceCheck(request, k);
    push(checkUnitSlip(k, reference.kAtT));
  }

  const textbook = textbookLine(law, feed);
  return {
    model,
    k,
    kUnit: rateConstantUnit(law),
    kStdErr: line ? line.slopeStdErr : NaN,
    kCI95: line ? line.slopeCI95 : [NaN, NaN],
    r2: line ? line.r2 : NaN,
    n: fit.lineRows.length,
    nonlinear: {
      k: nonlinear.k,
      kStdErr: nonlinear.kStdErr,
      kCI95: nonlinear.kCI95,
      Sinf: nonlinear.Sinf,
      residualStdDev: nonlinear.residualStdDev / data.valueScale,
      residuals: nonlinear.residuals.map((r) => r / data.valueScale),
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
    curve: predictedCurve(fit, data, ts, cs),
    units: { ...request.units },
  };
}

// Discriminating between rate laws needs far fewer points than a long logger record has: above
// this many, the comparison runs on evenly spaced rows (every law on the same ones).
export const COMPARISON_POINTS = 5000;

/** Curve fits of every law the feed allows, on the same data; best = smallest residual sum of squares. */
function compareLaws(
  data: RunData,
  requested: LawFit,
  requestedCurved: boolean,
  order: ArrayLike<number>,
  throughOrigin: boolean,
): NonNullable<FitResult["orderComparison"]> {
  const n = data.t.length;
  const stride = Math.ceil(n / COMPARISON_POINTS);
  const sample = stride === 1 ? data : everyNth(data, stride);
  const sampleOrder = stride === 1 ? order : timeOrder(sample.t);
  const { feed, valueScale } = sample;
  // the A-B law needs some B; without it only the A-only laws are compared
  const candidates = RATE_LAWS.filter((l: RateLaw) => l !== "second-order-AB" || feed.CB0 > 0);
  const laws: LawComparison[] = [];
  let best: LawComparison | null = null;
  for (const law of candidates) {
    const reuse = stride === 1 && law === requested.law;
    const f = reuse ? requested : fitLaw(law, sample, throughOrigin, true);
    const entry: LawComparison = {
      model: modelName(law, feed),
      k: f.nonlinear.k,
      kUnit: rateConstantUnit(law),
      kStdErr: f.nonlinear.kStdErr,
      sse: f.nonlinear.sse / (valueScale * valueScale),
      residualStdDev: f.nonlinear.residualStdDev / valueScale,
      curved: reuse ? requestedCurved : curvatureFlag(f, sampleOrder) !== null,
    };
    laws.push(entry);
    if (!best || entry.sse < best.sse) best = entry;
  }
  return { best: best!.model, laws, points: sample.t.length };
}

/** Every stride-th row (and the last), for the order comparison on long records. */
function everyNth(data: RunData, stride: number): RunData {
  const n = data.t.length;
  const rows: number[] = [];
  for (let i = 0; i < n; i += stride) rows.push(i);
  if (rows[rows.length - 1] !== n - 1) rows.push(n - 1);
  return {
    ...data,
    t: Float64Array.from(rows, (i) => data.t[i]),
    values: Float64Array.from(rows, (i) => data.values[i]),
  };
}

/** Reference k carried to the run temperature, and how far the fitted k is from it. */
function referenceCheck(request: FitRequest, k: number): NonNullable<FitResult["reference"]> {
  const ref = request.reference!;
  const tolerancePct = ref.tolerancePct ?? DEFAULT_TOLERANCE_PCT;
  const temperatureK = request.temperatureC === undefined ? undefined : celsiusToKelvin(request.temperatureC);
  const kAtT =
    ref.EaKJ === undefined || temperatureK === undefined || ref.TrefC === undefined
      ? ref.k
      : rateConstantAt(ref.k, celsiusToKelvin(ref.TrefC), ref.EaKJ * 1000, temperatureK);
  const deviationPct = ((k - kAtT) / kAtT) * 100;
  return { kAtT, deviationPct, withinTolerance: Math.abs(deviationPct) <= tolerancePct, tolerancePct, temperatureK };
}

/** CA and the measured value predicted by the curve fit, from 0 to the last time, in the request's units. */
function predictedCurve(fit: LawFit, data: RunData, ts: number, cs: number): FitResult["curve"] {
  let tMax = 0;
  for (const ti of data.t) tMax = Math.max(tMax, ti);
  const curve: FitResult["curve"] = { t: [], CA: [], value: [] };
  for (let i = 0; i < CURVE_POINTS; i++) {
    const ti = (tMax * i) / (CURVE_POINTS - 1);
    const c = concentrationA(fit.law, data.feed, fit.nonlinear.k, ti);
    curve.t.push(ti / ts);
    curve.CA.push(c / cs);
    curve.value.push(fromCA(fit.map, c) / data.valueScale);
  }
  return curve;
}

function formatNumber(x: number): string {
  return Number(x.toPrecision(4)).toString();
}
