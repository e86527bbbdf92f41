// One reading far from the rest: the largest externally studentised residual of the curve fit
// (weighted by the noise model), tested against a Bonferroni-corrected Student t quantile
// (Cook and Weisberg, Residuals and Influence in Regression, 1982, ch. 2; from memory).
// The curve fit's residuals are used rather than the straight line's because they are in the
// measured quantity, where the noise is as it was made: the transform skews late residuals.

import { tCritical } from "./statistics.ts";

/** family-wise false-alarm level over all readings of a run (a rule of this engine) */
export const OUTLIER_ALPHA = 0.005;
/** fewer readings than this cannot single one out */
export const OUTLIER_MIN_POINTS = 8;

export interface OutlierFound {
  row: number;
  /** externally studentised residual */
  t: number;
  /** the Bonferroni critical value it exceeded */
  critical: number;
}

/**
 * `residuals` raw (reading minus fit), `weights` 1/v^2, `leverage` from curveJacobian,
 * `parameters` the number the curve fit estimated.
 */
export function findOutlier(
  residuals: ArrayLike<number>,
  weights: ArrayLike<number> | undefined,
  leverage: ArrayLike<number>,
  parameters: number,
): OutlierFound | null {
  const n = residuals.length;
  if (n < OUTLIER_MIN_POINTS) return null;
  let sse = 0;
  for (let i = 0; i < n; i++) sse += (weights ? weights[i] : 1) * residuals[i] ** 2;
  const dof = n - parameters;
  if (!(sse > 0) || dof < 3) return null;
  let best: { row: number; t: number } | null = null;
  for (let i = 0; i < n; i++) {
    const h = leverage[i];
    if (!(h < 0.99)) continue;
    const e = ((weights ? weights[i] : 1) * residuals[i] ** 2) / (1 - h);
    const rest = (sse - e) / (dof - 1);
    if (!(rest > 0)) continue;
    const t = Math.sqrt(e / rest);
    if (!best || t > best.t) best = { row: i, t };
  }
  // t_crit exceeds 3 for every n and level used here: skip the quantile when far below it
  if (!best || best.t < 3) return null;
  const critical = tCritical(dof - 1, 1 - OUTLIER_ALPHA / n);
  return best.t > critical ? { ...best, critical } : null;
}
