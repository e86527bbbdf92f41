// Small statistical helpers: Student t quantiles (from jstat) and a runs test on residual signs.

import jStat from "jstat";

/** Two-sided Student t critical value, e.g. level 0.95 -> t(0.975, dof). NaN without degrees of freedom. */
export function tCritical(dof: number, level = 0.95): number {
  if (!(dof >= 1)) return NaN;
  // the quantile is an iterative inversion: remember the few (dof, level) pairs a session meets
  const key = dof * 1e6 + level;
  let t = quantiles.get(key);
  if (t === undefined) {
    t = jStat.studentt.inv(0.5 + level / 2, dof) as number;
    if (quantiles.size > 4096) quantiles.clear();
    quantiles.set(key, t);
  }
  return t;
}
const quantiles = new Map<number, number>();

/** Symmetric confidence interval estimate +/- t * stdErr. */
export function confidenceInterval(estimate: number, stdErr: number, dof: number, level = 0.95): [number, number] {
  const half = tCritical(dof, level) * stdErr;
  return [estimate - half, estimate + half];
}

export interface RunsTest {
  runs: number;
  expected: number;
  /** standard score of the run count; strongly negative means residuals come in long same-sign stretches */
  z: number;
  /** one-sided probability of this few runs or fewer under random signs (normal approximation) */
  pLow: number;
  /** indices (into the input order) of the longest same-sign stretch */
  longestRun: number[];
}

/**
 * Wald-Wolfowitz runs test on the signs of residuals taken in time order (Wald and
 * Wolfowitz, Ann. Math. Statist. 11 (1940) 147, from memory). Zeros are skipped.
 * Returns null when there are too few residuals of either sign for the normal approximation.
 */
export function runsTest(residuals: ArrayLike<number>): RunsTest | null {
  let nPos = 0;
  let nNeg = 0;
  let runs = 0;
  let prev = 0;
  let start = -1; // index where the current run began
  let length = 0;
  let bestStart = -1;
  let bestLength = 0;
  let bestEnd = -1;
  for (let i = 0; i < residuals.length; i++) {
    const s = Math.sign(residuals[i]);
    if (s === 0 || Number.isNaN(s)) continue;
    if (s > 0) nPos++;
    else nNeg++;
    if (s !== prev) {
      runs++;
      start = i;
      length = 0;
      prev = s;
    }
    length++;
    if (length > bestLength) {
      bestLength = length;
      bestStart = start;
      bestEnd = i;
    }
  }
  if (nPos < 2 || nNeg < 2) return null;
  const n = nPos + nNeg;
  const expected = (2 * nPos * nNeg) / n + 1;
  const variance = ((expected - 1) * (expected - 2)) / (n - 1);
  const z = (runs - expected) / Math.sqrt(variance);
  const longestRun: number[] = [];
  for (let i = bestStart; i <= bestEnd; i++) if (residuals[i] !== 0) longestRun.push(i);
  return { runs, expected, z, pLow: jStat.normal.cdf(z, 0, 1), longestRun };
}
