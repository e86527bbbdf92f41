// The curve fit linearised at its optimum: covariance of its parameters, each reading's leverage
// and its influence on each parameter. Standard Gauss-Newton asymptotics for weighted nonlinear
// least squares (Bates and Watts, Nonlinear Regression Analysis and Its Applications, 1988,
// ch. 2; from memory): Cov = s^2 (J'WJ)^-1, h_i = w_i J_i (J'WJ)^-1 J_i', and a small change dm_j
// of reading j moves the parameters by (J'WJ)^-1 J_j' w_j dm_j.

import { concentrationA, maxReactedA, sensitivityGivenCA, type Feed, type RateLaw } from "./rateLaws.ts";
import type { AffineMap } from "./measurement.ts";

export interface CurvePoint {
  law: RateLaw;
  feed: Feed;
  /** times as recorded, s */
  t: ArrayLike<number>;
  k: number;
  /** start offset added to every time (the reaction had run t0 before the clock's zero) */
  t0: number;
  /** estimate t0 too */
  t0Free: boolean;
  /** known map, or the fitted signal (S0 fixed, span = Sinf - S0 a parameter) */
  map?: AffineMap;
  S0?: number;
  span?: number;
  weights?: ArrayLike<number>;
}

export interface CurveLinearisation {
  /** parameter names in order: k, then t0 if free, then span if fitted */
  params: ("k" | "t0" | "span")[];
  /** (J'WJ)^-1, row-major p x p */
  inverse: Float64Array;
  /** leverage of each reading */
  leverage: Float64Array;
  /** d(parameter)/d(reading j) for each parameter, row-major p x n */
  influence: Float64Array;
}

/** Rate -dCA/dt at CA (the law's own form, CB from stoichiometry). */
export function rateOfA(law: RateLaw, feed: Feed, k: number, CA: number): number {
  switch (law) {
    case "first-order":
      return k * CA;
    case "second-order-A":
      return k * CA * CA;
    case "second-order-AB":
      return k * CA * (feed.CB0 - feed.nu * (feed.CA0 - CA));
  }
}

export function linearise(c: CurvePoint): CurveLinearisation | null {
  const { law, feed, t, k, t0, map, weights } = c;
  const n = t.length;
  const params: CurveLinearisation["params"] = ["k"];
  if (c.t0Free) params.push("t0");
  if (!map) params.push("span");
  const p = params.length;
  const reach = maxReactedA(feed);
  const J = new Float64Array(n * p);
  const M = new Float64Array(p * p);
  for (let i = 0; i < n; i++) {
    const tau = t[i] + t0;
    const CA = concentrationA(law, feed, k, tau);
    const dk = sensitivityGivenCA(law, feed, k, tau, CA);
    const dt = -rateOfA(law, feed, k, CA);
    const scale = map ? map.slope : -(c.span ?? 0) / reach;
    let col = 0;
    J[i * p + col++] = scale * dk;
    if (c.t0Free) J[i * p + col++] = scale * dt;
    if (!map) J[i * p + col++] = (feed.CA0 - CA) / reach;
    const w = weights ? weights[i] : 1;
    for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) M[a * p + b] += w * J[i * p + a] * J[i * p + b];
  }
  const inverse = invertSymmetric(M, p);
  if (!inverse) return null;
  const leverage = new Float64Array(n);
  const influence = new Float64Array(p * n);
  for (let i = 0; i < n; i++) {
    const w = weights ? weights[i] : 1;
    let h = 0;
    for (let a = 0; a < p; a++) {
      let row = 0;
      for (let b = 0; b < p; b++) row += inverse[a * p + b] * J[i * p + b];
      influence[a * n + i] = row * w;
      h += J[i * p + a] * row;
    }
    leverage[i] = w * h;
  }
  return { params, inverse, leverage, influence };
}

/** Inverse of a small symmetric positive definite matrix (p <= 3), or null when singular. */
export function invertSymmetric(M: Float64Array, p: number): Float64Array | null {
  const out = new Float64Array(p * p);
  if (p === 1) {
    if (!(M[0] > 0)) return null;
    out[0] = 1 / M[0];
    return out;
  }
  if (p === 2) {
    const det = M[0] * M[3] - M[1] * M[2];
    if (!(det > 0)) return null;
    out[0] = M[3] / det;
    out[1] = -M[1] / det;
    out[2] = -M[2] / det;
    out[3] = M[0] / det;
    return out;
  }
  // 3 x 3 by cofactors
  const [a, b, c, d, e, f, g, h, i] = M;
  const A = e * i - f * h;
  const B = -(d * i - f * g);
  const C = d * h - e * g;
  const det = a * A + b * B + c * C;
  if (!(det > 0) || !Number.isFinite(det)) return null;
  out[0] = A / det;
  out[1] = -(b * i - c * h) / det;
  out[2] = (b * f - c * e) / det;
  out[3] = B / det;
  out[4] = (a * i - c * g) / det;
  out[5] = -(a * f - c * d) / det;
  out[6] = C / det;
  out[7] = -(a * h - b * g) / det;
  out[8] = (a * e - b * d) / det;
  return out;
}
