// Temperature dependence of k: k = A exp(-Ea / (R T)).

import { fitLine } from "./linearFit.ts";
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
  r2: number;
  n: number;
  /** residuals of ln k, in run order */
  residuals: number[];
}

/** Least-squares line of ln k against 1/T across runs (slope -Ea/R, intercept ln A). Needs 3 runs or more. */
export function fitArrhenius(runs: readonly ArrheniusRun[]): ArrheniusFit {
  if (runs.length < 3) throw new Error("an Arrhenius fit with uncertainties needs at least 3 runs");
  for (const r of runs) {
    if (!(r.k > 0) || !(r.temperatureK > 0)) throw new Error("every run needs k > 0 and T > 0 K");
  }
  const line = fitLine(
    runs.map((r) => 1 / r.temperatureK),
    runs.map((r) => Math.log(r.k)),
  );
  const Ea = -GAS_CONSTANT * line.slope;
  const EaStdErr = GAS_CONSTANT * line.slopeStdErr;
  const lnACI = confidenceInterval(line.intercept, line.interceptStdErr, line.dof);
  return {
    Ea,
    EaStdErr,
    EaCI95: confidenceInterval(Ea, EaStdErr, line.dof),
    A: Math.exp(line.intercept),
    lnA: line.intercept,
    lnAStdErr: line.interceptStdErr,
    ACI95: [Math.exp(lnACI[0]), Math.exp(lnACI[1])],
    r2: line.r2,
    n: line.n,
    residuals: line.residuals,
  };
}
