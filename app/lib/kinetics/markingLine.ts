// The k that marks: the textbook straight line y(CA) = k t (+ intercept), fitted by weighted
// least squares with each reading weighted by its measurement error carried through the
// transform, w = 1 / var(y) = (dm/dCA)^2 / ((dy/dCA)^2 v^2) (first-order error propagation,
// e.g. Taylor, An Introduction to Error Analysis, 2nd ed., ch. 3 and 8; from memory), with
//   ln(CA0/CA):                    dy/dCA = -1/CA
//   1/CA - 1/CA0:                  dy/dCA = -1/CA^2
//   ln[(CB CA0)/(CB0 CA)] / D:     dy/dCA = -1/(CA CB)      (and -1/(nu CA^2) at D = 0)
// dm/dCA the slope of the measurement map and v the noise model's scale (noise.ts). The weights
// are evaluated at the fitted CA, not the measured one (weights from noisy readings bias the
// slope), and iterated: curve fit -> weights -> line -> weights -> line.
//
// The uncertainty is the delta method on the readings themselves: k is a weighted sum of the
// y values, and each y depends on its reading and, when Sinf was fitted, on Sinf, which depends
// on every reading through the curve fit. So var(k) = s^2 sum_j v_j^2 (dk/dm_j)^2, with
// dk/dm_j = c_j dy_j/dm_j + (sum_i c_i dy_i/dSinf) dSinf/dm_j; without a fitted Sinf this is
// the textbook s^2 / Sxx of a weighted line.

import { concentrationA, finalCA, lineY, type Feed, type RateLaw } from "./rateLaws.ts";
import { toCA, fromCA, type AffineMap, type MeasurementKind } from "./measurement.ts";
import { noiseScale, type NoiseModel } from "./noise.ts";
import { confidenceInterval } from "./statistics.ts";

export interface MarkingLineInput {
  law: RateLaw;
  feed: Feed;
  kind: MeasurementKind;
  noise: NoiseModel;
  t: ArrayLike<number>;
  values: ArrayLike<number>;
  map: AffineMap;
  throughOrigin: boolean;
  /** CA expected at each reading (from the curve fit), to start the weights */
  expectedCA: ArrayLike<number>;
  /** when Sinf was fitted: span = Sinf - S0 and dSinf/dm_j for every reading */
  sinf?: { span: number; influence: ArrayLike<number> };
  /** rows to leave out (a reviewer's exclusion, or the outlier refit) */
  skip?: ReadonlySet<number>;
  /** noise scale of the readings (sd = sigma v, measured units), from the curve fit */
  sigma: number;
}

export interface MarkingLine {
  slope: number;
  slopeStdErr: number;
  slopeCI95: [number, number];
  intercept: number;
  interceptStdErr: number;
  /** weighted R^2 */
  r2: number;
  /** noise scale s from the weighted residuals: a reading's sd is s v, in measured units */
  residualScale: number;
  dof: number;
  rows: number[];
  /** y - fitted y for each row used (scaled form, k t units) */
  residuals: number[];
  /** relative weight of each row used, largest 1 */
  weights: number[];
  /** rows whose reading has no straight-line value (at or past the long-time limit) */
  excludedRows: number[];
  /** var(k) part due to the fitted Sinf, as a share of the total (0 without) */
  sinfShare: number;
}

const REWEIGHT_PASSES = 2;
/**
 * A reading whose own noise spans a stretch of the transform that is far from straight,
 * sd(CA) |y''/y'| above this, is left out of the weighted line: the linearised weight is not
 * valid there and 1/CA or ln CA of a reading near zero has a long tail. Chosen on the seeded
 * audit (scripts/audit/accuracy.ts); such readings carry little weight anyway, and they are
 * picked on the fitted CA, not the reading, so leaving them out does not bias k.
 */
export const MAX_TRANSFORM_CURVATURE = 0.2;

/** |y''/y'| of the straight-line form at CA. */
export function curvatureRatio(law: RateLaw, feed: Feed, CA: number): number {
  switch (law) {
    case "first-order":
      return 1 / CA;
    case "second-order-A":
      return 2 / CA;
    case "second-order-AB":
      return 1 / CA + feed.nu / (feed.CB0 - feed.nu * (feed.CA0 - CA));
  }
}

/** dy/dCA of the scaled straight-line form. */
export function lineSlopeInCA(law: RateLaw, feed: Feed, CA: number): number {
  switch (law) {
    case "first-order":
      return -1 / CA;
    case "second-order-A":
      return -1 / (CA * CA);
    case "second-order-AB":
      return -1 / (CA * (feed.CB0 - feed.nu * (feed.CA0 - CA)));
  }
}

export function fitMarkingLine(input: MarkingLineInput): MarkingLine | null {
  const { law, feed, kind, noise, t, values, map, throughOrigin, skip } = input;
  const n = t.length;
  const end = finalCA(feed);
  const rows: number[] = [];
  const excludedRows: number[] = [];
  for (let i = 0; i < n; i++) {
    if (skip?.has(i)) continue;
    const CA = toCA(map, values[i]);
    const y = lineY(law, feed, CA);
    if (!(CA > end) || !Number.isFinite(y)) excludedRows.push(i);
    else rows.push(i);
  }
  const m = rows.length;
  const p = throughOrigin ? 1 : 2;
  if (m < p + 1) return null;
  const x = new Float64Array(m);
  const y = new Float64Array(m);
  const CAhat = new Float64Array(m);
  const w = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    const i = rows[j];
    x[j] = t[i];
    y[j] = lineY(law, feed, toCA(map, values[i]));
    CAhat[j] = input.expectedCA[i];
  }
  // floor for the relative noise scale, from the readings' range
  let top = 0;
  for (let i = 0; i < n; i++) top = Math.max(top, Math.abs(kind === "conversionA" ? 1 - values[i] : values[i]));
  const floor = 1e-3 * (top || 1);

  let slope = NaN;
  let intercept = 0;
  let sxx = 0;
  let xMean = 0;
  let sumW = 0;
  let wMax = 0;
  const gUsed = new Float64Array(m); // dy/dm at the weights' CA
  const vUsed = new Float64Array(m); // noise scale there
  const CAmeasured = new Float64Array(m);
  for (let j = 0; j < m; j++) CAmeasured[j] = toCA(map, values[rows[j]]);
  const lawCode = law === "first-order" ? 0 : law === "second-order-A" ? 1 : 2;
  const absolute = noise === "absolute";
  const slopeAbs = Math.abs(map.slope);
  let checkBend = true;
  for (let pass = 0; pass < REWEIGHT_PASSES; pass++) {
    wMax = 0;
    for (let j = 0; j < m; j++) {
      const ca = CAhat[j] > end ? CAhat[j] : CAmeasured[j];
      // dy/dCA and |y''/y'| of the form (see lineSlopeInCA and curvatureRatio), inlined: this
      // loop runs for every reading on every pass
      let dydc: number;
      let ratio: number;
      if (lawCode === 0) {
        dydc = -1 / ca;
        ratio = 1 / ca;
      } else if (lawCode === 1) {
        dydc = -1 / (ca * ca);
        ratio = 2 / ca;
      } else {
        const cb = feed.CB0 - feed.nu * (feed.CA0 - ca);
        dydc = -1 / (ca * cb);
        ratio = 1 / ca + feed.nu / cb;
      }
      const g = dydc / map.slope;
      const v = absolute ? 1 : noiseScale(noise, kind, map.offset + map.slope * ca, floor);
      gUsed[j] = g;
      vUsed[j] = v;
      const wj = 1 / (g * g * v * v);
      const bend = ((input.sigma * v) / slopeAbs) * ratio;
      w[j] = Number.isFinite(wj) && !(checkBend && bend > MAX_TRANSFORM_CURVATURE) ? wj : 0;
      if (w[j] > wMax) wMax = w[j];
    }
    if (pass === 0) {
      // too few readings where the transform is straight enough: keep them all rather than fail
      let kept = 0;
      for (let j = 0; j < m; j++) if (w[j] > 0) kept++;
      if (kept < p + 2) {
        checkBend = false;
        wMax = 0;
        for (let j = 0; j < m; j++) {
          const wj = 1 / (gUsed[j] * gUsed[j] * vUsed[j] * vUsed[j]);
          w[j] = Number.isFinite(wj) ? wj : 0;
          if (w[j] > wMax) wMax = w[j];
        }
      }
    }
    if (!(wMax > 0)) return null;
    for (let j = 0; j < m; j++) w[j] /= wMax; // keep the sums well scaled
    sumW = 0;
    xMean = 0;
    let yMean = 0;
    if (!throughOrigin) {
      for (let j = 0; j < m; j++) {
        sumW += w[j];
        xMean += w[j] * x[j];
        yMean += w[j] * y[j];
      }
      xMean /= sumW;
      yMean /= sumW;
    }
    sxx = 0;
    let sxy = 0;
    for (let j = 0; j < m; j++) {
      const dx = x[j] - xMean;
      sxx += w[j] * dx * dx;
      sxy += w[j] * dx * (y[j] - yMean);
    }
    slope = sxy / sxx;
    intercept = throughOrigin ? 0 : yMean - slope * xMean;
    if (!Number.isFinite(slope)) return null;
    if (pass < REWEIGHT_PASSES - 1) for (let j = 0; j < m; j++) CAhat[j] = concentrationA(law, feed, 1, intercept + slope * x[j]);
  }

  const residuals = new Array<number>(m);
  let sse = 0;
  let sst = 0;
  let yBar = 0;
  let wSum = 0;
  for (let j = 0; j < m; j++) {
    yBar += w[j] * y[j];
    wSum += w[j];
  }
  yBar /= wSum;
  for (let j = 0; j < m; j++) {
    const r = y[j] - intercept - slope * x[j];
    residuals[j] = r;
    sse += w[j] * r * r;
    sst += w[j] * (throughOrigin ? y[j] * y[j] : (y[j] - yBar) ** 2);
  }
  let used = 0;
  for (let j = 0; j < m; j++) if (w[j] > 0) used++;
  const dof = used - p - (input.sinf ? 1 : 0);
  // With w_j = 1/(g_j^2 v_j^2 wMax), the weighted residual variance s^2 estimates sigma^2/wMax,
  // sigma being the noise scale of the readings (sd = sigma v).
  const s2 = dof > 0 ? sse / dof : NaN;
  const sigma2 = s2 * wMax;

  // delta method: c_j = dk/dy_j, var(k) = sigma^2 sum_j v_j^2 (dk/dm_j)^2
  const c = new Float64Array(m);
  for (let j = 0; j < m; j++) c[j] = (w[j] * (throughOrigin ? x[j] : x[j] - xMean)) / sxx;
  let varDirect = 0;
  for (let j = 0; j < m; j++) varDirect += (vUsed[j] * c[j] * gUsed[j]) ** 2;
  let variance = varDirect;
  let sinfShare = 0;
  if (input.sinf) {
    const { span, influence } = input.sinf;
    // G = sum c_i dy_i/dSinf, dy/dSinf = dy/dCA * (CA0 - CA)/span at the reading's CA
    let G = 0;
    const direct = new Float64Array(n);
    const scale = new Float64Array(n).fill(NaN);
    for (let j = 0; j < m; j++) {
      const i = rows[j];
      const CA = CAmeasured[j];
      G += c[j] * lineSlopeInCA(law, feed, CA) * ((feed.CA0 - CA) / span);
      direct[i] = c[j] * gUsed[j];
      scale[i] = vUsed[j];
    }
    variance = 0;
    for (let i = 0; i < n; i++) {
      if (skip?.has(i)) continue;
      const v = Number.isFinite(scale[i]) ? scale[i] : noiseScale(noise, kind, values[i], floor);
      const d = direct[i] + G * influence[i];
      variance += v * v * d * d;
    }
    sinfShare = variance > 0 ? Math.max(0, 1 - varDirect / variance) : 0;
  }
  const slopeStdErr = Math.sqrt(sigma2 * variance);
  const interceptStdErr = throughOrigin ? NaN : Math.sqrt(s2 * (1 / sumW + (xMean * xMean) / sxx));
  return {
    slope,
    slopeStdErr,
    slopeCI95: confidenceInterval(slope, slopeStdErr, dof),
    intercept,
    interceptStdErr,
    r2: 1 - sse / sst,
    residualScale: Math.sqrt(sigma2),
    dof,
    rows,
    residuals,
    weights: Array.from(w),
    excludedRows,
    sinfShare,
  };
}
