// Ordinary least squares for a straight line, with or without an intercept.
// Written out because the regression packages at hand return slope and intercept but not
// their standard errors; centred sums keep full precision when t has a large offset.

import { confidenceInterval } from "./statistics.ts";

export interface LineFit {
  slope: number;
  intercept: number;
  slopeStdErr: number;
  /** NaN for a fit through the origin */
  interceptStdErr: number;
  slopeCI95: [number, number];
  /** sqrt(SSE / dof) */
  residualStdDev: number;
  /** 1 - SSE/SST; SST is centred with an intercept and uncentred through the origin */
  r2: number;
  sse: number;
  n: number;
  dof: number;
  residuals: number[];
  throughOrigin: boolean;
}

export function fitLine(x: ArrayLike<number>, y: ArrayLike<number>, throughOrigin = false): LineFit {
  const n = x.length;
  if (y.length !== n) throw new Error("x and y differ in length");
  const p = throughOrigin ? 1 : 2;
  let xMean = 0;
  let yMean = 0;
  if (!throughOrigin) {
    for (let i = 0; i < n; i++) {
      xMean += x[i];
      yMean += y[i];
    }
    xMean /= n;
    yMean /= n;
  }
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - xMean;
    const dy = y[i] - yMean;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const slope = sxy / sxx;
  const intercept = yMean - slope * xMean;
  const residuals = new Array<number>(n);
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - intercept - slope * x[i];
    residuals[i] = r;
    sse += r * r;
  }
  const dof = n - p;
  const variance = dof > 0 ? sse / dof : NaN;
  const slopeStdErr = Math.sqrt(variance / sxx);
  const interceptStdErr = throughOrigin ? NaN : Math.sqrt(variance * (1 / n + (xMean * xMean) / sxx));
  return {
    slope,
    intercept,
    slopeStdErr,
    interceptStdErr,
    slopeCI95: confidenceInterval(slope, slopeStdErr, dof),
    residualStdDev: Math.sqrt(variance),
    r2: 1 - sse / syy,
    sse,
    n,
    dof,
    residuals,
    throughOrigin,
  };
}
