// How the readings err: the noise model behind every weight in the engine.
// A reading m has standard deviation s * v(m): v = 1 for absolute noise (a burette, a probe or a
// spectrometer that errs by about the same amount on every reading), v = |m| for relative noise
// (an error proportional to the reading). For a conversion, relative means proportional to the
// unreacted fraction 1 - X, the concentration ratio it was computed from. s is always estimated
// from the residuals; only the shape v comes from the model.

import type { MeasurementKind } from "./measurement.ts";

export type NoiseModel = "absolute" | "relative";
/** what the request may ask for: a model, or "estimate" (the default) to choose one from the residuals */
export type NoiseChoice = NoiseModel | "estimate";
export const NOISE_CHOICES: readonly NoiseChoice[] = ["estimate", "absolute", "relative"];

/** Noise scale v of a reading whose expected value is `m` (always > 0). `floor` keeps v away from 0. */
export function noiseScale(model: NoiseModel, kind: MeasurementKind, m: number, floor: number): number {
  if (model === "absolute") return 1;
  const v = kind === "conversionA" ? Math.abs(1 - m) : Math.abs(m);
  return v > floor ? v : floor;
}

/** Weights 1/v^2 for expected values `expected` (measured units). */
export function noiseWeights(model: NoiseModel, kind: MeasurementKind, expected: ArrayLike<number>): Float64Array {
  const n = expected.length;
  const w = new Float64Array(n);
  if (model === "absolute") return w.fill(1);
  const floor = relativeFloor(kind, expected);
  for (let i = 0; i < n; i++) {
    const v = noiseScale(model, kind, expected[i], floor);
    w[i] = 1 / (v * v);
  }
  return w;
}

// A relative error cannot shrink without limit near zero: no instrument reads better than about
// a thousandth of its range (common practice, no source).
const RELATIVE_FLOOR = 1e-3;

function relativeFloor(kind: MeasurementKind, expected: ArrayLike<number>): number {
  let top = 0;
  for (let i = 0; i < expected.length; i++) {
    const v = kind === "conversionA" ? Math.abs(1 - expected[i]) : Math.abs(expected[i]);
    if (v > top) top = v;
  }
  return RELATIVE_FLOOR * (top || 1);
}

export interface NoiseEstimate {
  model: NoiseModel;
  /** whether the request fixed the model or it was chosen from the residuals */
  chosen: "request" | "residuals";
  /** Gaussian log-likelihood of the residuals under each model, at its best scale */
  logLikelihood: { absolute: number; relative: number };
}

/**
 * Picks the model under which the residuals of a fit are more likely (normal errors, each model
 * with its own best scale; both have one free parameter, so the likelihoods compare directly).
 * `expected` are the fitted values, `residuals` the readings minus them.
 */
export function chooseNoiseModel(
  choice: NoiseChoice,
  kind: MeasurementKind,
  expected: ArrayLike<number>,
  residuals: ArrayLike<number>,
  /** the relative model judged at its own (weighted) fit, when there is one */
  relativeFit?: { expected: ArrayLike<number>; residuals: ArrayLike<number> },
): NoiseEstimate {
  const absolute = logLikelihood("absolute", kind, expected, residuals);
  const relative = relativeFit
    ? logLikelihood("relative", kind, relativeFit.expected, relativeFit.residuals)
    : logLikelihood("relative", kind, expected, residuals);
  if (choice !== "estimate") return { model: choice, chosen: "request", logLikelihood: { absolute, relative } };
  // ties (exact data, or readings that hardly change) go to absolute noise, the usual case
  return { model: relative > absolute ? "relative" : "absolute", chosen: "residuals", logLikelihood: { absolute, relative } };
}

function logLikelihood(model: NoiseModel, kind: MeasurementKind, expected: ArrayLike<number>, residuals: ArrayLike<number>): number {
  const n = residuals.length;
  if (n === 0) return NaN;
  const floor = relativeFloor(kind, expected);
  let sumSq = 0;
  let sumLog = 0;
  for (let i = 0; i < n; i++) {
    const v = noiseScale(model, kind, expected[i], floor);
    sumSq += (residuals[i] / v) ** 2;
    sumLog += Math.log(v);
  }
  // -n/2 ln(s^2) - sum ln v, with s^2 = sumSq / n; constants common to both models dropped
  const s2 = sumSq / n;
  if (!(s2 > 0)) return model === "absolute" ? Infinity : -Infinity;
  return -0.5 * n * Math.log(s2) - sumLog;
}
