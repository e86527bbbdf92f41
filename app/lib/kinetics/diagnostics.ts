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
  | "fit-not-converged";

export interface Flag {
  code: FlagCode;
  message: string;
  rows: number[];
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

const SLIPS: { factor: number; hint: string }[] = [
  { factor: 60, hint: "minutes entered as seconds (or hours as minutes)" },
  { factor: 1 / 60, hint: "seconds entered as minutes (or minutes as hours)" },
  { factor: 3600, hint: "hours entered as seconds" },
  { factor: 1 / 3600, hint: "seconds entered as hours" },
  { factor: 1000, hint: "mol/L entered as mmol/L, or a reference k per millisecond" },
  { factor: 1 / 1000, hint: "mmol/L entered as mol/L" },
];

/** Fitted k off from the reference by about a unit-conversion factor. */
export function checkUnitSlip(k: number, kReference: number): Flag | null {
  const ratio = k / kReference;
  if (!(ratio > 0)) return null;
  for (const slip of SLIPS) {
    if (Math.abs(Math.log(ratio / slip.factor)) <= Math.log(UNIT_SLIP_BAND)) {
      return {
        code: "unit-slip",
        message: `The fitted k is ${formatRatio(ratio)} times the reference k, close to a unit factor: perhaps ${slip.hint}. Check the units.`,
        rows: [],
      };
    }
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
export function checkCurvature(residualsInTimeOrder: ArrayLike<number>, rowsInTimeOrder: ArrayLike<number>): Flag | null {
  if (residualsInTimeOrder.length < CURVATURE_MIN_POINTS) return null;
  const test = runsTest(residualsInTimeOrder);
  if (!test || !(test.pLow < CURVATURE_P)) return null;
  return {
    code: "curvature",
    message: `The residuals bend systematically (${test.runs} runs of one sign where about ${test.expected.toFixed(0)} are expected, p = ${test.pLow.toPrecision(2)}): the rate law may not fit, or Sinf, the start time or the temperature drifted. The rows listed are the longest stretch on one side of the curve.`,
    rows: test.longestRun.map((i) => rowsInTimeOrder[i]).sort((a, b) => a - b),
  };
}

/** Another supported rate law leaves a much smaller residual sum of squares (a rule of this engine). */
export function checkOrderMismatch(n: number, requested: string, requestedSse: number, best: string, bestSse: number): Flag | null {
  if (n < MIN_POINTS || best === requested || !(requestedSse > 2 * bestSse)) return null;
  return {
    code: "order-mismatch",
    message: `The ${best} law fits these data better than the ${requested} law asked for (residual sum of squares ${bestSse.toPrecision(3)} against ${requestedSse.toPrecision(3)}).`,
    rows: [],
  };
}

/**
 * The straight-line k and the curve-fit k disagree by more than `STRAIGHT_LINE_BIAS_SIGMAS`
 * combined standard errors (a rule of this engine). Both come from the same data, so their
 * difference is usually far smaller than that; a large one means the transform to the
 * straight line has distorted the noise, typically close to the long-time limit.
 */
export const STRAIGHT_LINE_BIAS_SIGMAS = 3;

export function checkStraightLineBias(kLine: number, seLine: number, kCurve: number, seCurve: number): Flag | null {
  const combined = Math.hypot(seLine, seCurve);
  if (!(combined > 0) || !(Math.abs(kLine - kCurve) > STRAIGHT_LINE_BIAS_SIGMAS * combined)) return null;
  return {
    code: "straight-line-bias",
    message: `The straight-line k (${kLine.toPrecision(3)}) and the curve-fit k (${kCurve.toPrecision(3)}) differ by more than their uncertainties allow: the straight-line transform magnifies the noise in some points (often near the end of the run). Prefer the curve-fit k.`,
    rows: [],
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
