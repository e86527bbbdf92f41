// One fit request -> one result: converts units at the edge, fits the requested rate law
// (the weighted straight line that marks, the unweighted hand line, and the curve fit that
// cross-checks them), compares the other laws, runs the diagnostics and the reference check.
// Shared by the command line, API routes and the browser preview.

import {
  concentrationA,
  finalCA,
  lawFromOrders,
  limitingReagent,
  lineY,
  maxReactedA,
  modelName,
  rateConstantUnit,
  textbookLine,
  type ModelName,
  type RateLaw,
} from "./rateLaws.ts";
import { fromCA, measurementMap, signalMap, type AffineMap } from "./measurement.ts";
import { rateConstantAt } from "./arrhenius.ts";
import {
  checkBeyondAsymptote,
  checkConverged,
  checkCurvature,
  checkFewPoints,
  checkFitsDisagree,
  checkLowConversion,
  checkOrderMismatch,
  checkStraightLineBias,
  checkTimeOrder,
  checkUnitSlip,
  type Flag,
} from "./diagnostics.ts";
import { COMPARISON_TOLERANCE, fitLaw, fitShifted, searchStartOffset, timeOrder, toSI, type LawFit, type RunData } from "./lawFit.ts";
import { chooseNoiseModel, noiseWeights, type NoiseModel } from "./noise.ts";
import { fitNonlinear, type NonlinearFit } from "./nonlinearFit.ts";
import { fitMarkingLine, type MarkingLine } from "./markingLine.ts";
import { linearise, type CurveLinearisation } from "./curveJacobian.ts";
import { findOutlier } from "./outliers.ts";
import { checkFeed, formatFactor, likelyCause, type FeedFinding } from "./feedCheck.ts";
import { candidateLaws, compare, type FittedCandidate, type LawComparison, type OrderComparison } from "./orderComparison.ts";
import { runsTest, confidenceInterval } from "./statistics.ts";
import jStat from "jstat";
import { celsiusToKelvin, molPerLitrePer, secondsPer, type ConcentrationUnit, type TimeUnit } from "./units.ts";
import type { FitRequest } from "./request.ts";
import { fitSignalStart } from "./signalStart.ts";

export type { LawComparison, OrderComparison };

/** Marking tolerance when the request gives none: published k scatter 20-30 % (common practice, no source). */
export const DEFAULT_TOLERANCE_PCT = 20;
const CURVE_POINTS = 61;
/** level of the F-test that accepts a free start offset (a rule of this engine) */
export const START_OFFSET_P = 0.01;

/**
 * The contract fields come first (model ... reference); the rest are extras.
 * Numbers that cannot be computed are NaN (null once serialised to JSON).
 */
export interface FitResult {
  model: ModelName;
  /** the marking k, per second (1/s or L/(mol s)), defined on A; from `kSource` */
  k: number;
  kUnit: "1/s" | "L/(mol*s)";
  kStdErr: number;
  kCI95: [number, number];
  /** weighted R^2 of the marking line */
  r2: number;
  /** readings in the marking line */
  n: number;
  /** the estimator behind k: the weighted straight line (the usual case) or the curve fit */
  kSource: "weighted-line" | "curve";
  /** k is defined on A: -dCA/dt = k CA^orderA CB^orderB */
  kDefinedOn: "A";
  /** the rate law k belongs to, as text */
  rateLaw: string;
  /** the noise model behind every weight, and its estimated scale (sd = scale * v, noise.ts) */
  noise: {
    model: NoiseModel;
    chosen: "request" | "residuals";
    scale: number;
    /** k's uncertainty averaged over both models because the readings left the choice in doubt */
    averaged: boolean;
  };
  /** the marking fit: weighted least squares of the textbook straight line */
  weightedLine: {
    k: number;
    kStdErr: number;
    kCI95: [number, number];
    r2: number;
    intercept: number;
    interceptStdErr: number;
    /** start-time offset the intercept implies (intercept / k), request's time unit */
    timeOffset: number;
    rows: number[];
    /** relative weight of each row (largest 1) */
    weights: number[];
    residuals: number[];
    /** rows without a straight-line value (at or past the long-time limit), left out */
    excludedRows: number[];
    /** share of var(k) due to the fitted Sinf (0 when Sinf was given) */
    sinfShare: number;
  };
  nonlinear: {
    k: number;
    kStdErr: number;
    kCI95: [number, number];
    /** final signal fitted as a second parameter (signal units), when the request left Sinf out */
    Sinf?: { value: number; stdErr: number; ci95: [number, number] };
    /** start offset estimated because the first readings were not at the feed: the reaction had run this long (request's time unit) at the clock's zero */
    start?: { offset: number; stdErr: number; ci95: [number, number]; F: number; p: number };
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
    /** what the request's reference k was defined on; kAtT is always on A */
    definedOn: "A" | "reaction";
    /** the factor applied to carry the reference to k on A (a for "reaction", else 1) */
    factorToA: number;
  };
  /** the unweighted straight line, the hand method (for checking a group's own k) */
  line: {
    k: number;
    kStdErr: number;
    kCI95: [number, number];
    r2: number;
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
  orderComparison?: OrderComparison;
  /** a signal's start value fitted (options.fitSignalStart: the first reading came after mixing), signal units */
  signalStart?: { S0: number; stdErr: number; ci95: [number, number] };
  limitingReagent: "A" | "B";
  /** long-time CA set by stoichiometry, request's concentration unit */
  finalCA: number;
  /** share of the limiting reagent reacted by the last time, from the nonlinear fit */
  fractionReacted: number;
  /** predicted CA and measured value from the nonlinear fit, request's units (times as recorded) */
  curve: { t: number[]; CA: number[]; value: number[] };
  units: { time: TimeUnit; concentration: ConcentrationUnit };
}

export function runFit(request: FitRequest): FitResult {
  if (request.options?.fitSignalStart && request.measurement.kind === "signal") return runWithFittedStart(request);
  const data = toSI(request);
  const { feed, measurement } = data;
  const kind = measurement.kind;
  const law = lawFromOrders(request.reaction.orderA, request.reaction.orderB);
  if (!law) throw new Error("unsupported orders: validate the request first");
  const throughOrigin = request.options?.lineThroughOrigin ?? false;
  const ts = secondsPer(request.units.time);
  const cs = molPerLitrePer(request.units.concentration);
  const n = data.t.length;
  const order = timeOrder(data.t);
  const lastRow = order[n - 1];
  const model = modelName(law, feed);
  const sinfFitted = measurement.kind === "signal" && measurement.Sinf === undefined;

  // 1. unweighted fits: the hand line, and a curve fit to find the noise model
  const hand = fitLaw(law, data, throughOrigin);
  const expected0 = expectedValues(hand.nonlinear, data.values);
  // 2. the curve fit under the noise model (the same fit when noise is absolute). To choose
  // the model, each is judged at its own best fit: an unweighted fit misplaces the late,
  // precise readings of relative noise, which would make relative noise look unlikely.
  const choice = request.options?.noise ?? "estimate";
  let noise = choice === "estimate" ? chooseOnRows(law, data, hand, expected0, kind) : chooseNoiseModel(choice, kind, expected0, hand.nonlinear.residuals);
  const relativeWeights = noise.model === "relative" ? noiseWeights("relative", kind, expected0) : undefined;
  let weights = relativeWeights;
  let curve: NonlinearFit = weights ? refitCurve(law, data, hand, weights) : hand.nonlinear;
  if (weights) {
    // weights from the weighted fit's own values, not the unweighted one's (one more pass of
    // iteratively reweighted least squares)
    weights = noiseWeights("relative", kind, expectedValues(curve, data.values));
    curve = refitCurve(law, data, hand, weights, curve.k);
  }
  const fixedCurve = curve;
  let map: AffineMap = sinfFitted ? signalMap((measurement as { S0: number }).S0, curve.Sinf!.value, feed) : hand.map;
  let t0 = 0;
  let start: FitResult["nonlinear"]["start"];

  // 3. the marking line
  let lin = linearise(curveAt(law, data, curve, map, 0, false, weights));
  // noise scale for the transform check: the curve fit's, or the readings' own when a poor
  // curve (a late start, a wrong law) inflates it
  const scatter = modelFreeScale(data, weights);
  const sigma = curve.residualStdDev <= 2 * scatter ? curve.residualStdDev : scatter;
  let mark = markingLine(law, data, map, noise.model, throughOrigin, curve, 0, lin, sigma);

  // 4. free start: a clearly positive intercept means the reaction was under way at the clock's zero
  if (mark && !throughOrigin && mark.intercept > 3 * mark.interceptStdErr && mark.slope > 0 && n >= 6) {
    const guess = mark.intercept / mark.slope;
    // searched and tested unweighted, against the unweighted fixed-start fit: the noise model
    // chosen on a misfit is not to be trusted, so it is chosen again on the shifted fit
    const found = searchStartOffset(law, data, sinfFitted ? undefined : hand.map, undefined, hand.nonlinear.k, 3 * guess);
    const p = hand.nonlinear.dof;
    const F = ((hand.nonlinear.sse - found.fit.sse) * (p - 1)) / found.fit.sse;
    const pValue = 1 - jStat.centralF.cdf(F, 1, p - 1);
    if (found.t0 > 0 && found.fit.converged && F > 0 && pValue < START_OFFSET_P) {
      t0 = found.t0;
      curve = found.fit;
      const expected = expectedValues(curve, data.values);
      noise = chooseNoiseModel(request.options?.noise ?? "estimate", kind, expected, curve.residuals);
      weights = noise.model === "absolute" ? undefined : noiseWeights(noise.model, kind, expected);
      if (weights) curve = fitShifted(law, data, sinfFitted ? undefined : hand.map, t0, weights, curve.k);
      if (sinfFitted) map = signalMap((measurement as { S0: number }).S0, curve.Sinf!.value, feed);
      lin = linearise(curveAt(law, data, curve, map, t0, true, weights));
      const s2 = curve.sse / (curve.dof - 1);
      const t0Index = lin ? lin.params.indexOf("t0") : -1;
      const kSe = lin ? Math.sqrt(s2 * lin.inverse[0]) : NaN;
      const t0Se = lin && t0Index >= 0 ? Math.sqrt(s2 * lin.inverse[t0Index * lin.params.length + t0Index]) : NaN;
      curve = { ...curve, kStdErr: kSe, kCI95: confidenceInterval(curve.k, kSe, curve.dof - 1), dof: curve.dof - 1, residualStdDev: Math.sqrt(s2) };
      start = { offset: t0 / ts, stdErr: t0Se / ts, ci95: confidenceInterval(t0, t0Se, curve.dof).map((x) => x / ts) as [number, number], F, p: pValue };
      mark = markingLine(law, data, map, noise.model, throughOrigin, curve, t0, lin, Math.min(sigma, curve.residualStdDev));
    }
  }

  const flags: Flag[] = [];
  const push = (f: Flag | null) => {
    if (f) flags.push(f);
  };
  push(checkFewPoints(n));
  push(checkTimeOrder(data.t));

  // exact data: the curve fit's residuals are rounding (a millionth of a millionth of the change)
  const change = Math.abs(map.slope * maxReactedA(feed));
  const exact = curve.residualStdDev * (weights ? typicalScale(expected0, kind) : 1) <= 1e-9 * change;

  // noise sd of each reading, for the feed and asymptote checks
  const sd = readingSd(curve, weights, data, kind, expected0);
  const end = finalCA(feed);
  const feedFinding = checkFeed({
    feed,
    measurement,
    map,
    endKnown: !sinfFitted,
    t: data.t,
    values: data.values,
    sd,
    feedText: feedText(request, kind),
    concentrationUnit: request.units.concentration,
  });
  // with relative noise chosen, also the unweighted view: a wrong feed misleads the choice
  const feedFound =
    feedFinding ??
    (sinfFitted ? null : impliedFeed(law, data, hand, fixedCurve, weights, sd, request, 2) ?? (weights ? impliedFeed(law, data, hand, hand.nonlinear, undefined, sd, request, 3, true) : null));
  if (feedFound) flags.push({ code: "feed-mismatch", message: feedFound.message, rows: feedFound.rows, factor: feedFound.factor });

  // readings past the long-time limit: left out of the lines; flagged when beyond noise
  const excluded = mark ? mark.excludedRows : hand.beyondRows;
  const beyond = excluded.filter((i) => {
    const p = (feed.CA0 - (data.values[i] - map.offset) / map.slope) / maxReactedA(feed);
    const band = (3 * sd[i]) / change;
    return p - 1 > band || predictedProgress(law, feed, curve.k, data.t[i] + t0) < 0.9;
  });
  if (!feedFound) push(checkBeyondAsymptote(beyond, `CA = ${formatNumber(end / cs)} ${request.units.concentration}`));

  const fractionReacted = (feed.CA0 - concentrationA(law, feed, curve.k, data.t[lastRow] + t0)) / maxReactedA(feed);
  push(checkLowConversion(fractionReacted, limitingReagent(feed), lastRow));
  const curvature = curvatureOf(curve.residuals, weights, order, exact);
  push(curvature);
  push(checkConverged(curve.converged));

  // the k that marks: the weighted line, except with Sinf fitted, where the line needs the
  // curve fit's Sinf anyway and the seeded audit shows it less reliable than the curve fit
  // itself (README: figures)
  const useCurve = sinfFitted || !mark || !Number.isFinite(mark.slopeStdErr);
  const k = useCurve ? curve.k : mark!.slope;
  let kStdErr = useCurve ? curve.kStdErr : mark!.slopeStdErr;
  let kCI95: [number, number] = useCurve ? curve.kCI95 : mark!.slopeCI95;
  // When the readings leave the noise model in doubt, k's uncertainty includes that doubt:
  // the model-averaged variance p var + q var' + p q (k - k')^2 with Akaike weights p, q of the
  // two models (Burnham and Anderson 2002, section 4.3, unconditional variance; from memory).
  let noiseAveraged = false;
  if (noise.chosen === "residuals" && !exact && Number.isFinite(kStdErr)) {
    const d = Math.abs(noise.logLikelihood.relative - noise.logLikelihood.absolute);
    const q = 1 / (1 + Math.exp(d));
    if (q > 0.01) {
      const other: NoiseModel = noise.model === "absolute" ? "relative" : "absolute";
      const otherWeights = other === "relative" ? noiseWeights("relative", kind, expectedValues(curve, data.values)) : undefined;
      let kOther = NaN;
      let seOther = NaN;
      if (useCurve) {
        const c2 = t0 > 0 ? fitShifted(law, data, sinfFitted ? undefined : hand.map, t0, otherWeights, curve.k) : otherWeights ? refitCurve(law, data, hand, otherWeights, curve.k) : hand.nonlinear;
        kOther = c2.k;
        seOther = c2.kStdErr;
      } else {
        // the other model's noise scale, from the same curve's residuals
        let ss = 0;
        for (let i = 0; i < n; i++) ss += (otherWeights ? otherWeights[i] : 1) * curve.residuals[i] ** 2;
        const sigmaOther = Math.sqrt(ss / Math.max(1, curve.dof));
        const m2 = markingLine(law, data, map, other, throughOrigin, curve, t0, lin, sigmaOther);
        if (m2) {
          kOther = m2.slope;
          seOther = m2.slopeStdErr;
        }
      }
      if (Number.isFinite(kOther) && Number.isFinite(seOther)) {
        const p = 1 - q;
        const averaged = Math.sqrt(p * kStdErr * kStdErr + q * seOther * seOther + p * q * (k - kOther) ** 2);
        const dof = useCurve ? curve.dof : mark!.dof;
        kStdErr = averaged;
        kCI95 = confidenceInterval(k, averaged, dof);
        noiseAveraged = true;
      }
    }
  }

  if (mark && !exact) {
    const prefer = curvature || !curve.converged ? "weighted-line" : "curve";
    const why =
      prefer === "curve"
        ? "it is fitted to the readings as measured, with no transform to distort their noise" + (start ? ", and it allows for the late start it found" : "")
        : "the curve fit's residuals bend or it did not settle, so its k is the less reliable";
    push(checkFitsDisagree(mark.slope, mark.slopeStdErr, curve.k, curve.kStdErr, prefer, why));
  }
  if (hand.line && !exact) push(checkStraightLineBias(hand.line.slope, hand.line.slopeStdErr, k, kStdErr));

  // one reading far from the rest
  if (lin && !exact) {
    const outlier = findOutlier(curve.residuals, weights, lin.leverage, lin.params.length);
    if (outlier) {
      const without = markingLine(law, data, map, noise.model, throughOrigin, curve, t0, lin, sigma, new Set([outlier.row]));
      const kWithout = without ? without.slope : NaN;
      flags.push({
        code: "outlier",
        message: `Row ${outlier.row} lies far from the rest (studentised residual ${outlier.t.toFixed(1)}, beyond ${outlier.critical.toFixed(1)} for ${n} readings): without it k would be ${formatNumber(kWithout)} instead of ${formatNumber(k)} ${rateConstantUnit(law)}. The mark keeps every reading unless a person excludes one.`,
        rows: [outlier.row],
        kWithout,
      });
    }
  }

  let orderComparison: OrderComparison | undefined;
  if (request.options?.compareOrders ?? true) {
    // with a late start found, every law gets its own start offset too
    orderComparison = t0 > 0
      ? compareLaws(law, data, curve, weights, curvature !== null, order, throughOrigin, exact, 3 * t0)
      : compareLaws(law, data, fixedCurve, weights, curvature !== null, order, throughOrigin, exact);
    const asked = orderComparison.laws.find((l) => l.model === model || l.equivalent.includes(model));
    const best = orderComparison.laws.find((l) => l.model === orderComparison!.best)!;
    if (asked && !exact) push(checkOrderMismatch(n, model, best.model, asked.deltaAIC, orderComparison.threshold));
  }

  let reference: FitResult["reference"];
  if (request.reference) {
    reference = referenceCheck(request, k);
    if (!feedFound) push(checkUnitSlip(k, reference.kAtT, law !== "first-order"));
  }

  const textbook = textbookLine(law, feed);
  const handLine = hand.line;
  return {
    model,
    k,
    kUnit: rateConstantUnit(law),
    kStdErr,
    kCI95,
    r2: mark ? mark.r2 : NaN,
    n: mark ? mark.rows.length : 0,
    kSource: useCurve ? "curve" : "weighted-line",
    kDefinedOn: "A",
    rateLaw: rateLawText(law),
    noise: {
      model: noise.model,
      chosen: noise.chosen,
      scale: mark ? mark.residualScale / data.valueScale : curve.residualStdDev / data.valueScale,
      averaged: noiseAveraged,
    },
    weightedLine: {
      k: mark ? mark.slope : NaN,
      kStdErr: mark ? mark.slopeStdErr : NaN,
      kCI95: mark ? mark.slopeCI95 : [NaN, NaN],
      r2: mark ? mark.r2 : NaN,
      intercept: mark ? mark.intercept : NaN,
      interceptStdErr: mark ? mark.interceptStdErr : NaN,
      timeOffset: mark ? mark.intercept / mark.slope / ts : NaN,
      rows: mark ? mark.rows : [],
      weights: mark ? mark.weights : [],
      residuals: mark ? mark.residuals : [],
      excludedRows: mark ? mark.excludedRows : [],
      sinfShare: mark ? mark.sinfShare : 0,
    },
    nonlinear: {
      k: curve.k,
      kStdErr: curve.kStdErr,
      kCI95: curve.kCI95,
      Sinf: curve.Sinf,
      start,
      residualStdDev: curve.residualStdDev / data.valueScale,
      residuals: curve.residuals.map((r) => r / data.valueScale),
      iterations: curve.iterations,
      converged: curve.converged,
    },
    flags,
    reference,
    line: {
      k: handLine ? handLine.slope : NaN,
      kStdErr: handLine ? handLine.slopeStdErr : NaN,
      kCI95: handLine ? handLine.slopeCI95 : [NaN, NaN],
      r2: handLine ? handLine.r2 : NaN,
      form: textbook.y,
      slopeFactor: textbook.factor,
      intercept: handLine ? handLine.intercept : NaN,
      interceptStdErr: handLine ? handLine.interceptStdErr : NaN,
      timeOffset: handLine ? handLine.intercept / handLine.slope / ts : NaN,
      throughOrigin,
      rows: hand.lineRows,
      residuals: handLine ? handLine.residuals : [],
    },
    orderComparison,
    limitingReagent: limitingReagent(feed),
    finalCA: end / cs,
    fractionReacted,
    curve: predictedCurve(law, data, curve.k, t0, map, ts, cs),
    units: { ...request.units },
  };
}

/** rows on which the noise model is chosen for long records (evenly spaced) */
const NOISE_CHOICE_POINTS = 2000;

/**
 * Absolute or relative noise, each judged at its own best fit (an unweighted fit misplaces the
 * late, precise readings of relative noise, which would make relative noise look unlikely).
 * Long records are judged on evenly spaced rows.
 */
function chooseOnRows(law: RateLaw, data: RunData, hand: LawFit, expected: Float64Array, kind: FitRequest["measurement"]["kind"]) {
  const n = data.t.length;
  const stride = Math.ceil(n / NOISE_CHOICE_POINTS);
  const rows = stride > 1 ? sampleRows(n, stride) : null;
  const sub = rows ? pick(data, rows) : data;
  const subExpected = rows ? Float64Array.from(rows, (i) => expected[i]) : expected;
  const subResiduals = rows ? rows.map((i) => hand.nonlinear.residuals[i]) : hand.nonlinear.residuals;
  const relativeFit = refitCurve(law, sub, hand, noiseWeights("relative", kind, subExpected));
  return chooseNoiseModel("estimate", kind, subExpected, subResiduals, {
    expected: expectedValues(relativeFit, sub.values),
    residuals: relativeFit.residuals,
  });
}

/** rows the free feed-value test runs on for long records */
const FEED_TEST_POINTS = 2000;

/** level of the F-test by which the readings reject the stated feed value (a rule of this engine) */
export const FEED_VALUE_P = 0.001;

/**
 * When the first reading sits above the start the feed gives (which a late start cannot explain)
 * and far from the curve, the feed value of the measured species (CA0, or CB0 for B) is
 * fitted freely: if the readings reject the stated value (F-test at FEED_VALUE_P) by more than
 * 2 %, they imply a different feed.
 */
function impliedFeed(
  law: RateLaw,
  data: RunData,
  hand: LawFit,
  stated: NonlinearFit,
  weights: Float64Array | undefined,
  sd: ArrayLike<number>,
  request: FitRequest,
  zMin: number,
  relativeCheck = false,
): FeedFinding | null {
  const { feed, measurement, t, values } = data;
  const n = t.length;
  if (n < 6 || !stated.converged) return null;
  let first = 0;
  for (let i = 1; i < n; i++) if (t[i] < t[first]) first = i;
  const reach = maxReactedA(feed);
  const map = hand.map;
  const pFirst = (feed.CA0 - (values[first] - map.offset) / map.slope) / reach;
  // above the start, and further from the curve than twice the curve's noise scale
  const z = stated.residuals[first] * Math.sign(map.slope) * Math.sqrt(weights ? weights[first] : 1) / stated.residualStdDev;
  if (!(pFirst < 0) || !(z > zMin)) return null;
  void sd;
  if (n > FEED_TEST_POINTS) {
    // long records: the search and the test on evenly spaced rows (the first one among them)
    const rows = sampleRows(n, Math.ceil(n / FEED_TEST_POINTS));
    if (!rows.includes(first)) rows.unshift(first);
    const sub = pick(data, rows);
    const subWeights = weights ? Float64Array.from(rows, (i) => weights[i]) : undefined;
    const subStated = fitNonlinear({ law, feed, t: sub.t, values: sub.values, map, weights: subWeights }, stated.k);
    const found = impliedFeed(law, sub, hand, subStated, subWeights, sd, request, -Infinity, relativeCheck);
    return found ? { ...found, rows: [first] } : null;
  }
  const onB = measurement.kind === "concentrationB" || (measurement.kind === "absorbance" && measurement.species === "B");
  const trial = (f: number) => {
    const fe = onB ? { ...feed, CB0: feed.CB0 * f } : { ...feed, CA0: feed.CA0 * f };
    const m = measurementMap(measurement, fe);
    return fitNonlinear({ law, feed: fe, t, values, map: m, weights }, stated.k);
  };
  // golden-section search on ln f in [ln(1/1.6), ln 1.6]
  const phi = (Math.sqrt(5) - 1) / 2;
  let a = -Math.log(1.6);
  let b = Math.log(1.6);
  let c = b - phi * (b - a);
  let d = a + phi * (b - a);
  let fc = trial(Math.exp(c)).sse;
  let fd = trial(Math.exp(d)).sse;
  for (let it = 0; it < 40 && b - a > 1e-4; it++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - phi * (b - a);
      fc = trial(Math.exp(c)).sse;
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + phi * (b - a);
      fd = trial(Math.exp(d)).sse;
    }
  }
  const factor = Math.exp((a + b) / 2);
  const best = trial(factor);
  const dof = stated.dof - 1;
  const F = ((stated.sse - best.sse) * dof) / best.sse;
  if (!(F > jStat.centralF.inv(1 - FEED_VALUE_P, 1, dof)) || Math.abs(factor - 1) < 0.02) return null;
  // the unweighted view of relative noise overstates early misfit: demand more of it
  if (relativeCheck && (!(F > jStat.centralF.inv(1 - 1e-6, 1, dof)) || Math.abs(factor - 1) < 0.1)) return null;
  if (!weights && relativeCheck) {
    // the unweighted view, taken because relative noise was chosen: only when, with the feed
    // value freed, absolute noise is the likelier model after all (a wrong feed misled the choice)
    const fe = onB ? { ...feed, CB0: feed.CB0 * factor } : { ...feed, CA0: feed.CA0 * factor };
    const m = measurementMap(measurement, fe);
    const expected = expectedValues(best, values);
    const relFit = fitNonlinear({ law, feed: fe, t, values, map: m, weights: noiseWeights("relative", measurement.kind, expected) }, best.k);
    const again = chooseNoiseModel("estimate", measurement.kind, expected, best.residuals, { expected: expectedValues(relFit, values), residuals: relFit.residuals });
    if (again.model !== "absolute") return null;
  }
  const u = request.units.concentration;
  const name = onB ? "CB0" : "CA0";
  const given = onB ? request.feed.CB0! : request.feed.CA0;
  return {
    factor,
    rows: [first],
    message: `The readings start above what the stated feed allows and fit best with ${name} = ${formatNumber(given * factor)} ${u}, ${formatFactor(factor)} times the stated ${formatNumber(given)} ${u} (F = ${F.toPrecision(3)}, p < ${FEED_VALUE_P}): ${likelyCause(factor, u)}`,
  };
}

/** -dCA/dt = k CA..., as text. */
function rateLawText(law: RateLaw): string {
  switch (law) {
    case "first-order":
      return "-dCA/dt = k CA";
    case "second-order-A":
      return "-dCA/dt = k CA^2";
    case "second-order-AB":
      return "-dCA/dt = k CA CB";
  }
}

function expectedValues(fit: NonlinearFit, values: ArrayLike<number>): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = values[i] - fit.residuals[i];
  return out;
}

function typicalScale(expected: ArrayLike<number>, kind: string): number {
  let top = 0;
  for (let i = 0; i < expected.length; i++) top = Math.max(top, Math.abs(kind === "conversionA" ? 1 - expected[i] : expected[i]));
  return top;
}

function refitCurve(law: RateLaw, data: RunData, hand: LawFit, weights: Float64Array, kGuess = hand.nonlinear.k): NonlinearFit {
  const { feed, measurement, t, values } = data;
  if (measurement.kind === "signal" && measurement.Sinf === undefined) {
    return fitNonlinear({ law, feed, t, values, S0: measurement.S0, weights }, kGuess);
  }
  return fitNonlinear({ law, feed, t, values, map: hand.map, weights }, kGuess);
}

function curveAt(law: RateLaw, data: RunData, curve: NonlinearFit, map: AffineMap, t0: number, t0Free: boolean, weights?: ArrayLike<number>) {
  const sinfFitted = data.measurement.kind === "signal" && data.measurement.Sinf === undefined;
  return {
    law,
    feed: data.feed,
    t: data.t,
    k: curve.k,
    t0,
    t0Free,
    map: sinfFitted ? undefined : map,
    S0: sinfFitted ? (data.measurement as { S0: number }).S0 : undefined,
    span: sinfFitted ? curve.Sinf!.value - (data.measurement as { S0: number }).S0 : undefined,
    weights,
  };
}

function markingLine(
  law: RateLaw,
  data: RunData,
  map: AffineMap,
  noise: NoiseModel,
  throughOrigin: boolean,
  curve: NonlinearFit,
  t0: number,
  lin: CurveLinearisation | null,
  sigma: number,
  skip?: ReadonlySet<number>,
): MarkingLine | null {
  const { feed, t } = data;
  const expectedCA = new Float64Array(t.length);
  for (let i = 0; i < t.length; i++) expectedCA[i] = concentrationA(law, feed, curve.k, t[i] + t0);
  let sinf: { span: number; influence: Float64Array } | undefined;
  if (data.measurement.kind === "signal" && data.measurement.Sinf === undefined && lin) {
    const p = lin.params.length;
    const row = lin.params.indexOf("span");
    sinf = { span: curve.Sinf!.value - data.measurement.S0, influence: lin.influence.subarray(row * t.length, (row + 1) * t.length) };
    void p;
  }
  return fitMarkingLine({ law, feed, kind: data.measurement.kind, noise, t, values: data.values, map, throughOrigin, expectedCA, sinf, skip, sigma });
}

/** sd of each reading under the curve fit's noise scale, the smaller of that and a model-free estimate. */
function readingSd(curve: NonlinearFit, weights: Float64Array | undefined, data: RunData, kind: string, expected: ArrayLike<number>): Float64Array {
  const n = data.t.length;
  const scale = Math.min(curve.residualStdDev, modelFreeScale(data, weights));
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = weights ? scale / Math.sqrt(weights[i]) : scale;
  void kind;
  void expected;
  return out;
}

/**
 * Noise scale from the readings alone: each reading against the straight line through its two
 * neighbours in time, root mean square (the curvature of the run between neighbours only adds).
 */
function modelFreeScale(data: RunData, weights: Float64Array | undefined): number {
  const order = timeOrder(data.t);
  const n = order.length;
  if (n < 5) return Infinity;
  let sum = 0;
  let count = 0;
  for (let j = 1; j < n - 1; j++) {
    const a = order[j - 1];
    const i = order[j];
    const b = order[j + 1];
    const span = data.t[b] - data.t[a];
    if (!(span > 0)) continue;
    const fa = (data.t[b] - data.t[i]) / span;
    const fb = (data.t[i] - data.t[a]) / span;
    const r = data.values[i] - fa * data.values[a] - fb * data.values[b];
    const w = weights ? weights[i] : 1;
    sum += (w * r * r) / (1 + fa * fa + fb * fb);
    count++;
  }
  return count >= 3 ? Math.sqrt(sum / count) : Infinity;
}

function predictedProgress(law: RateLaw, feed: RunData["feed"], k: number, t: number): number {
  return (feed.CA0 - concentrationA(law, feed, k, t)) / maxReactedA(feed);
}

function curvatureOf(residuals: number[], weights: Float64Array | undefined, order: ArrayLike<number>, exact: boolean): Flag | null {
  const inOrder = new Float64Array(order.length);
  for (let i = 0; i < order.length; i++) inOrder[i] = residuals[order[i]] * (weights ? Math.sqrt(weights[order[i]]) : 1);
  return checkCurvature(inOrder, order, exact);
}

function feedText(request: FitRequest, kind: string): string {
  const u = request.units.concentration;
  if (kind === "concentrationB" || (request.measurement.kind === "absorbance" && request.measurement.species === "B")) return `CB0 = ${request.feed.CB0} ${u}`;
  if (request.measurement.kind === "signal") return `S0 = ${request.measurement.S0}`;
  return `CA0 = ${request.feed.CA0} ${u}`;
}

// Discriminating between rate laws needs far fewer points than a long logger record has: above
// this many, the comparison runs on evenly spaced rows (every law on the same ones).
export const COMPARISON_POINTS = 5000;

/** Curve fits of every law the feed allows, on the same rows with the same weights, compared by AIC. */
function compareLaws(
  requested: RateLaw,
  data: RunData,
  requestedFit: NonlinearFit,
  weights: Float64Array | undefined,
  requestedCurved: boolean,
  order: ArrayLike<number>,
  throughOrigin: boolean,
  exact: boolean,
  startRange = 0,
): OrderComparison {
  const n = data.t.length;
  const stride = Math.ceil(n / COMPARISON_POINTS);
  const rows = stride === 1 ? null : sampleRows(n, stride);
  const sample = rows ? pick(data, rows) : data;
  const sampleWeights = rows && weights ? Float64Array.from(rows, (i) => weights[i]) : weights;
  const sampleOrder = rows ? timeOrder(sample.t) : order;
  const fits: FittedCandidate[] = [];
  for (const c of candidateLaws(data.feed)) {
    const group = [c.law, ...c.equivalent];
    const isRequested = group.includes(requested);
    const law = isRequested ? requested : c.law;
    const equivalent = group.filter((l) => l !== law);
    const reuse = isRequested && !rows;
    const seed = isRequested ? requestedFit.k : halfLifeSeed(requested, law, data.feed, requestedFit.k);
    const sinfFitted = data.measurement.kind === "signal" && data.measurement.Sinf === undefined;
    const f = reuse
      ? requestedFit
      : startRange > 0 && seed !== undefined
        ? searchStartOffset(law, sample, sinfFitted ? undefined : measurementMap(data.measurement, data.feed), sampleWeights, seed, startRange).fit
        : otherLaw(law, sample, sampleWeights, seed, throughOrigin);
    let raw = 0;
    for (const r of f.residuals) raw += r * r;
    fits.push({
      law,
      equivalent,
      k: f.k,
      kStdErr: f.kStdErr,
      sse: raw / (sample.valueScale * sample.valueScale),
      weightedSse: f.sse,
      residualStdDev: Math.sqrt(raw / Math.max(1, f.dof)) / sample.valueScale,
      curved: reuse ? requestedCurved : curvatureOf(f.residuals, sampleWeights, sampleOrder, exact) !== null,
    });
  }
  // rounding level: a millionth of a millionth of the change, per reading
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of sample.values) {
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  const floor = sample.t.length * (1e-12 * (hi - lo || 1)) ** 2;
  return compare(requested, data.feed, fits, sample.t.length, floor);
}

/**
 * Seed for another law's curve fit: the k that reaches half of the possible change at the same
 * time as the requested law's fit does (both forms are exact there), which starts the
 * refinement near the other law's optimum.
 */
function halfLifeSeed(requested: RateLaw, other: RateLaw, feed: RunData["feed"], k: number): number | undefined {
  const half = feed.CA0 - 0.5 * maxReactedA(feed);
  const tHalf = lineY(requested, feed, half) / k;
  const seed = lineY(other, feed, half) / tHalf;
  return seed > 0 && Number.isFinite(seed) ? seed : undefined;
}

/** Curve fit of a law for the comparison only (a looser stop: its SSE is what counts). */
function otherLaw(law: RateLaw, data: RunData, weights: ArrayLike<number> | undefined, kGuess: number | undefined, throughOrigin: boolean): NonlinearFit {
  const { feed, measurement, t, values } = data;
  if (kGuess === undefined) return fitLaw(law, data, throughOrigin, true, weights).nonlinear;
  if (measurement.kind === "signal" && measurement.Sinf === undefined) return fitNonlinear({ law, feed, t, values, S0: measurement.S0, weights }, kGuess, COMPARISON_TOLERANCE);
  return fitNonlinear({ law, feed, t, values, map: measurementMap(measurement, feed), weights }, kGuess, COMPARISON_TOLERANCE);
}

function sampleRows(n: number, stride: number): number[] {
  const rows: number[] = [];
  for (let i = 0; i < n; i += stride) rows.push(i);
  if (rows[rows.length - 1] !== n - 1) rows.push(n - 1);
  return rows;
}

function pick(data: RunData, rows: number[]): RunData {
  return { ...data, t: Float64Array.from(rows, (i) => data.t[i]), values: Float64Array.from(rows, (i) => data.values[i]) };
}

/** Reference k carried to the run temperature, and how far the fitted k is from it. */
/**
 * A signal run whose first reading came after mixing: S0 from the curve fit (signalStart.ts), then
 * the whole fit with that S0, marked with the curve fit and k's interval from the joint covariance
 * of (k, S0[, Sinf]). Readings weigh alike (absolute noise), as in the search for S0.
 */
function runWithFittedStart(request: FitRequest): FitResult {
  const { fitSignalStart: _drop, ...options } = request.options!;
  const inner: FitRequest = { ...request, options: { ...options, noise: "absolute" } };
  const start = fitSignalStart(inner);
  if (!start) return runFit(inner);
  const result = runFit({ ...inner, measurement: { ...(request.measurement as { kind: "signal"; S0: number; Sinf?: number }), S0: start.S0 } });
  const k = result.nonlinear.k;
  result.signalStart = { S0: start.S0, stdErr: start.stdErr, ci95: start.ci95 };
  result.nonlinear.kStdErr = start.kStdErr;
  result.nonlinear.kCI95 = start.kCI95;
  result.k = k;
  result.kStdErr = start.kStdErr;
  result.kCI95 = start.kCI95;
  result.kSource = "curve";
  if (request.reference) result.reference = referenceCheck(request, k);
  return result;
}

function referenceCheck(request: FitRequest, k: number): NonNullable<FitResult["reference"]> {
  const ref = request.reference!;
  const tolerancePct = ref.tolerancePct ?? DEFAULT_TOLERANCE_PCT;
  const temperatureK = request.temperatureC === undefined ? undefined : celsiusToKelvin(request.temperatureC);
  const definedOn = ref.definedOn ?? "A";
  // rate of reaction r = -(1/a) dCA/dt = k_r CA..., so -dCA/dt = a k_r CA...: k on A = a k_r
  const factorToA = definedOn === "reaction" ? request.reaction.a : 1;
  const kRef = ref.k * factorToA;
  const kAtT =
    ref.EaKJ === undefined || temperatureK === undefined || ref.TrefC === undefined
      ? kRef
      : rateConstantAt(kRef, celsiusToKelvin(ref.TrefC), ref.EaKJ * 1000, temperatureK);
  const deviationPct = ((k - kAtT) / kAtT) * 100;
  return { kAtT, deviationPct, withinTolerance: Math.abs(deviationPct) <= tolerancePct, tolerancePct, temperatureK, definedOn, factorToA };
}

/** CA and the measured value predicted by the curve fit, from 0 to the last time, in the request's units. */
function predictedCurve(law: RateLaw, data: RunData, k: number, t0: number, map: AffineMap, ts: number, cs: number): FitResult["curve"] {
  let tMax = 0;
  for (const ti of data.t) tMax = Math.max(tMax, ti);
  const curve: FitResult["curve"] = { t: [], CA: [], value: [] };
  for (let i = 0; i < CURVE_POINTS; i++) {
    const ti = (tMax * i) / (CURVE_POINTS - 1);
    const c = concentrationA(law, data.feed, k, ti + t0);
    curve.t.push(ti / ts);
    curve.CA.push(c / cs);
    curve.value.push(fromCA(map, c) / data.valueScale);
  }
  return curve;
}

function formatNumber(x: number): string {
  return Number.isFinite(x) ? Number(x.toPrecision(4)).toString() : String(x);
}
void runsTest;
void formatFactor;
