// Temperature dependence of k: k = A exp(-Ea / (R T)).

import { confidenceInterval } from "./statistics.ts";

/** Molar gas constant, J/(mol K) (exact in the 2019 SI: N_A k_B). */
export const GAS_CONSTANT = 8.314462618;

/** k at temperature T (K) from k at Tref (K) and the activation energy Ea (J/mol). */
export function rateConstantAt(kRef: number, TrefK: number, EaJ: number, TK: number): number {
  return kRef * Math.exp((-EaJ / GAS_CONSTANT) * (1 / TK - 1 / TrefK));
}

export interface ArrheniusRun {
  temperatureK: number;
  /** rate constant, per second (1/s or L/(mol s)) */
  k: number;
  /** standard error of k; when every run has one, the fit is weighted by them */
  kStdErr?: number;
  /** the bench's name, echoed in the residuals */
  id?: string;
}

export interface ArrheniusFit {
  /** activation energy, J/mol */
  Ea: number;
  EaStdErr: number;
  EaCI95: [number, number];
  /** pre-exponential factor, same unit as k */
  A: number;
  lnA: number;
  lnAStdErr: number;
  /** from the interval on ln A, so not symmetric about A */
  ACI95: [number, number];
  /** weighted R^2 of ln k against 1/T */
  r2: number;
  n: number;
  dof: number;
  /** "k-uncertainty": weights 1/var(ln k) = (k / kStdErr)^2; "equal": no kStdErr given */
  weighting: "k-uncertainty" | "equal";
  /** weighted SSE / dof: about 1 when the benches scatter as their k uncertainties say; more means extra scatter between benches */
  reducedChiSquare: number;
  /** residuals of ln k, in run order */
  residuals: number[];
  /** per bench: ln k residual, and divided by its standard deviation under the fit */
  benches: { id: string; temperatureK: number; k: number; kFitted: number; lnResidual: number; standardised: number }[];
}

/**
 * Least-squares line of ln k against 1/T across runs (slope -Ea/R, intercept ln A), weighted by
 * var(ln k) = (kStdErr/k)^2 (first-order propagation) when every run has a kStdErr. The
 * covariance is scaled by the residual variance (weighted SSE / dof), the convention of NIST
 * StRD and of common regression software for weighted fits, so the intervals widen when the
 * benches scatter more than their own k uncertainties say; Student t with n - 2 degrees of freedom.
 * Needs 3 runs or more.
 */
export function fitArrhenius(runs: readonly ArrheniusRun[]): ArrheniusFit {
  if (runs.length < 3) throw new Error("an Arrhenius fit with uncertainties needs at least 3 runs");
  for (const r of runs) {
    if (!(r.k > 0) || !(r.temperatureK > 0)) throw new Error("every run needs k > 0 and T > 0 K");
  }
  const weighted = runs.every((r) => r.kStdErr !== undefined && r.kStdErr > 0);
  const x = runs.map((r) => 1 / r.temperatureK);
  const y = runs.map((r) => Math.log(r.k));
  const w = runs.map((r) => (weighted ? (r.k / r.kStdErr!) ** 2 : 1));
  const line = fitWeightedLine(x, y, w);
  const Ea = -GAS_CONSTANT * line.slope;
  const EaStdErr = GAS_CONSTANT * line.slopeStdErr;
  const lnACI = confidenceInterval(line.intercept, line.interceptStdErr, line.dof);
  const s2 = line.sse / line.dof;
  return {
    Ea,
    EaStdErr,
    EaCI95: confidenceInterval(Ea, EaStdErr, line.dof),
    A: Math.exp(line.intercept),
    lnA: line.intercept,
    lnAStdErr: line.interceptStdErr,
    ACI95: [Math.exp(lnACI[0]), Math.exp(lnACI[1])],
    r2: line.r2,
    n: runs.length,
    dof: line.dof,
    weighting: weighted ? "k-uncertainty" : "equal",
    reducedChiSquare: s2,
    residuals: line.residuals,
    benches: runs.map((r, i) => ({
      id: r.id ?? String(i + 1),
      temperatureK: r.temperatureK,
      k: r.k,
      kFitted: Math.exp(line.intercept + line.slope * x[i]),
      lnResidual: line.residuals[i],
      standardised: line.residuals[i] * Math.sqrt(w[i] / s2),
    })),
  };
}

/** Weighted least-squares line with intercept; weights 1/var up to a common factor. */
export function fitWeightedLine(x: readonly number[], y: readonly number[], w: readonly number[]) {
  const n = x.length;
  let sw = 0;
  let xm = 0;
  let ym = 0;
  for (let i = 0; i < n; i++) {
    sw += w[i];
    xm += w[i] * x[i];
    ym += w[i] * y[i];
  }
  xm /= sw;
  ym /= sw;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    sxx += w[i] * (x[i] - xm) ** 2;
    sxy += w[i] * (x[i] - xm) * (y[i] - ym);
    syy += w[i] * (y[i] - ym) ** 2;
  }
  const slope = sxy / sxx;
  const intercept = ym - slope * xm;
  const residuals = x.map((xi, i) => y[i] - intercept - slope * xi);
  const sse = residuals.reduce((a, r, i) => a + w[i] * r * r, 0);
  const dof = n - 2;
  const s2 = sse / dof;
  return {
    slope,
    intercept,
    slopeStdErr: Math.sqrt(s2 / sxx),
    interceptStdErr: Math.sqrt(s2 * (1 / sw + (xm * xm) / sxx)),
    r2: 1 - sse / syy,
    sse,
    dof,
    residuals,
  };
}

export interface ArrheniusResult extends ArrheniusFit {
  /** Ea in kJ/mol, and its 95 % interval */
  EaKJ: number;
  EaKJCI95: [number, number];
}

/** The pooled Arrhenius fit for a validated request (temperatures in degrees Celsius). */
export function runArrhenius(benches: readonly { id?: string; temperatureC: number; k: number; kStdErr?: number }[]): ArrheniusResult {
  const fit = fitArrhenius(benches.map((b, i) => ({ id: b.id ?? String(i + 1), temperatureK: b.temperatureC + 273.15, k: b.k, kStdErr: b.kStdErr })));
  return { ...fit, EaKJ: fit.Ea / 1000, EaKJCI95: [fit.EaCI95[0] / 1000, fit.EaCI95[1] / 1000] };
}
