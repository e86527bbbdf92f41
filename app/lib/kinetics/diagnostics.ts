// Checks on a run that an instructor should see next to the fitted k. Each flag has a
// stable code, a plain message and the rows concerned (0-based indices into the points).

import { runsTest } from "./statistics.ts";

export type FlagCode =
  | "few-points"
  | "low-conversion"
  | "unit-slip"
  | "curvature"
  | "beyond-asymptote"
  | "time-order"
  | "order-mismatch"
  | "straight-line-bias"
  | "fit-not-converged"
  | "feed-mismatch"
  | "outlier"
  | "fits-disagree";

export interface Flag {
  code: FlagCode;
  message: string;
  rows: number[];
  /** outlier: the marking k refitted without the flagged row (the mark itself keeps every reading) */
  kWithout?: number;
  /** feed-mismatch and unit-slip: the factor found */
  factor?: number;
  /** fits-disagree: which estimate to trust */
  prefer?: "weighted-line" | "curve";
}

// Thresholds below are common practice, no source, unless marked otherwise.
export const MIN_POINTS = 5;
export const MIN_FRACTION_REACTED = 0.2;
/** one-sided level for the runs test: few false alarms on good data */
export const CURVATURE_P = 0.005;
/** the runs test's normal approximation needs a handful of residuals of each sign */
export const CURVATURE_MIN_POINTS = 10;
/** a ratio within this factor of 60, 3600 or 1000 (or inverses) counts as "near" */
export const UNIT_SLIP_BAND = 1.5;

export function checkFewPoints(n: number): Flag | null {
  if (n >= MIN_POINTS) return null;
  return {
    code: "few-points",
    message: `Only ${n} points: at least ${MIN_POINTS} are needed for a trustworthy rate constant and its uncertainty.`,
    rows: Array.from({ length: n }, (_, i) => i),
  };
}

/** Negative times, times that repeat an earlier one, and times earlier than the row before. */
export function checkTimeOrder(times: ArrayLike<number>): Flag | null {
  let clean = true;
  for (let i = 0; i < times.length && clean; i++) clean = times[i] >= 0 && (i === 0 || times[i] > times[i - 1]);
  if (clean) return null; // strictly increasing from zero or later: nothing to report
  const negative: number[] = [];
  const repeated: number[] = [];
  const decreasing: number[] = [];
  const seen = new Set<number>();
  for (let i = 0; i < times.length; i++) {
    const t = times[i];
    if (t < 0) negative.push(i);
    if (seen.has(t)) repeated.push(i);
    seen.add(t);
    if (i > 0 && t < times[i - 1]) decreasing.push(i);
  }
  const parts: string[] = [];
  if (negative.length) parts.push(`${negative.length} negative`);
  if (repeated.length) parts.push(`${repeated.length} repeating an earlier time`);
  if (decreasing.length) parts.push(`${decreasing.length} earlier than the row before`);
  const rows = [...new Set([...negative, ...repeated, ...decreasing])].sort((a, b) => a - b);
  return { code: "time-order", message: `Times out of order: ${parts.join(", ")}. Check the time column.`, rows };
}

/** Rows at or past the long-time limit of CA: the straight-line form is undefined there. */
export function checkBeyondAsymptote(rows: readonly number[], limitText: string): Flag | null {
  if (rows.length === 0) return null;
  return {
    code: "beyond-asymptote",
    message: `${rows.length} value(s) at or past the long-time limit (${limitText}), where the straight-line form is undefined; they were left out of the straight-line fit.`,
    rows: [...rows],
  };
}

/** fractionReacted: share of the limiting reagent used up by the last time. */
export function checkLowConversion(fractionReacted: number, limiting: "A" | "B", lastRow: number): Flag | null {
  if (!(fractionReacted < MIN_FRACTION_REACTED)) return null;
  const pct = Math.max(0, fractionReacted * 100).toFixed(0);
  return {
    code: "low-conversion",
    message: `Only about ${pct} % of the limiting reagent (${limiting}) had reacted by the last point; below ${MIN_FRACTION_REACTED * 100} % the rate law and k are poorly determined. Run longer.`,
    rows: [lastRow],
  };
}

// R = fitted k / reference k. Times read t times too short (unit says s, numbers are minutes)
// make k t times too large; concentrations read c times too large make a second-order k c times
// too small (k ~ 1/(C t)); a first-order k has no concentration in it.
// Hints carry no full stop: the marking feedback quotes the text between "perhaps" and the first one.
const TIME_SLIPS: { factor: number; hint: string }[] = [
  { factor: 60, hint: "minutes entered as seconds (or hours as minutes)" },
  { factor: 1 / 60, hint: "seconds entered as minutes (or minutes as hours), or a reference k per minute" },
  { factor: 3600, hint: "hours entered as seconds" },
  { factor: 1 / 3600, hint: "seconds entered as hours, or a reference k per hour" },
];
const CONCENTRATION_SLIPS: { factor: number; hint: string }[] = [
  { factor: 1 / 1000, hint: "mmol/L entered as mol/L, for the feed and the readings alike" },
  { factor: 1000, hint: "mol/L entered as mmol/L, for the feed and the readings alike, or a reference k in L/(mmol s)" },
];

/**
 * Fitted k off from the reference by about a unit-conversion factor, or a product of a time and
 * a concentration factor; concentration factors only for a k that has a concentration unit.
 */
export function checkUnitSlip(k: number, kReference: number, kHasConcentration = true): Flag | null {
  const ratio = k / kReference;
  if (!(ratio > 0)) return null;
  const candidates: { factor: number; hint: string }[] = [...TIME_SLIPS];
  if (kHasConcentration) {
    for (const c of CONCENTRATION_SLIPS) {
      candidates.push(c);
      for (const t of TIME_SLIPS) candidates.push({ factor: c.factor * t.factor, hint: `${c.hint}, and ${t.hint}` });
    }
  }
  let best: { factor: number; hint: string; off: number } | null = null;
  for (const slip of candidates) {
    const off = Math.abs(Math.log(ratio / slip.factor));
    if (off <= Math.log(UNIT_SLIP_BAND) && (!best || off < best.off)) best = { ...slip, off };
  }
  if (best) {
    return {
      code: "unit-slip",
      message: `The fitted k is ${formatRatio(ratio)} times the reference k, close to the unit factor ${formatRatio(best.factor)}: perhaps ${best.hint}. Check the units.`,
      rows: [],
      factor: ratio,
    };
  }
  if (!kHasConcentration && Math.abs(Math.log(ratio / 1000)) <= Math.log(UNIT_SLIP_BAND) || !kHasConcentration && Math.abs(Math.log(ratio * 1000)) <= Math.log(UNIT_SLIP_BAND)) {
    return {
      code: "unit-slip",
      message: `The fitted k is ${formatRatio(ratio)} times the reference k. A first-order k does not depend on the concentration unit, so this is not a mol/L against mmol/L slip: check the reference k's unit (1/s) and the time unit.`,
      rows: [],
      factor: ratio,
    };
  }
  return null;
}

function formatRatio(r: number): string {
  return r >= 1 ? r.toPrecision(3) : `1/${(1 / r).toPrecision(3)}`;
}

/**
 * Residuals of the nonlinear fit that come in long same-sign stretches (runs test) mean the
 * curve bends away from the data: wrong order, wrong Sinf, drift or a temperature change.
 * `rowsInTimeOrder[i]` is the row of `residualsInTimeOrder[i]`.
 */
export function checkCurvature(residualsInTimeOrder: ArrayLike<number>, rowsInTimeOrder: ArrayLike<number>, exact = false): Flag | null {
  // exact data: the residuals are rounding, whose signs mean nothing
  if (exact || residualsInTimeOrder.length < CURVATURE_MIN_POINTS) return null;
  const test = runsTest(residualsInTimeOrder);
  if (!test || !(test.pLow < CURVATURE_P)) return null;
  return {
    code: "curvature",
    message: `The residuals bend systematically (${test.runs} runs of one sign where about ${test.expected.toFixed(0)} are expected, p = ${test.pLow.toPrecision(2)}): the rate law may not fit, or Sinf, the start time or the temperature drifted. The rows listed are the longest stretch on one side of the curve.`,
    rows: test.longestRun.map((i) => rowsInTimeOrder[i]).sort((a, b) => a - b),
  };
}

/** Another supported rate law is decidedly more likely (information criterion, orderComparison.ts). */
export function checkOrderMismatch(n: number, requested: string, best: string, delta: number, threshold: number): Flag | null {
  if (n < MIN_POINTS || best === requested || !(delta >= threshold)) return null;
  return {
    code: "order-mismatch",
    message: `The ${best} law fits these readings decidedly better than the ${requested} law asked for (AIC lower by ${delta.toPrecision(3)}; ${threshold} or more counts as decided).`,
    rows: [],
  };
}

/**
 * Two estimates of k from the same readings disagree by more than `STRAIGHT_LINE_BIAS_SIGMAS`
 * combined standard errors (a rule of this engine; both come from the same data, so their
 * difference is usually far smaller) and by more than a share of k that matters for a mark.
 */
export const STRAIGHT_LINE_BIAS_SIGMAS = 3;
/** differences below this share of k are never flagged (exact data agree to rounding) */
export const MIN_FLAGGED_DIFFERENCE = 0.02;

function disagree(k1: number, se1: number, k2: number, se2: number): boolean {
  const combined = Math.hypot(se1, se2);
  const diff = Math.abs(k1 - k2);
  return combined > 0 && diff > STRAIGHT_LINE_BIAS_SIGMAS * combined && diff > MIN_FLAGGED_DIFFERENCE * Math.abs(k2);
}

/** The unweighted (hand-method) line against the marking k. */
export function checkStraightLineBias(kLine: number, seLine: number, kMark: number, seMark: number): Flag | null {
  if (!disagree(kLine, seLine, kMark, seMark)) return null;
  return {
    code: "straight-line-bias",
    message: `The unweighted straight line (the hand method) gives k = ${kLine.toPrecision(3)}, off the weighted k = ${kMark.toPrecision(3)} by more than their uncertainties allow: the transform magnifies the noise of some readings (often near the end of the run). The mark uses the weighted k; a group's hand value near ${kLine.toPrecision(3)} is this bias, not an arithmetic slip.`,
    rows: [],
  };
}

/** The weighted line and the curve fit disagree; `prefer` says which to trust and why. */
export function checkFitsDisagree(
  kLine: number,
  seLine: number,
  kCurve: number,
  seCurve: number,
  prefer: "weighted-line" | "curve",
  why: string,
): Flag | null {
  if (!disagree(kLine, seLine, kCurve, seCurve)) return null;
  const trusted = prefer === "curve" ? `the curve-fit k (${kCurve.toPrecision(3)})` : `the weighted-line k (${kLine.toPrecision(3)})`;
  return {
    code: "fits-disagree",
    message: `The weighted straight line (k = ${kLine.toPrecision(3)}) and the curve fit to the readings (k = ${kCurve.toPrecision(3)}) differ by more than their uncertainties allow. Trust ${trusted}: ${why}`,
    rows: [],
    prefer,
  };
}

export function checkConverged(converged: boolean): Flag | null {
  if (converged) return null;
  return {
    code: "fit-not-converged",
    message: "The curve fit did not settle on a best k (the data may show no reaction, or too little of it); its k and uncertainty are not reliable.",
    rows: [],
  };
}
