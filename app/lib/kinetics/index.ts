// Public face of the kinetics engine. Pure TypeScript: no framework, database or node imports,
// so the server, the browser preview, the command line and the tests all run the same code.

export {
  validateFitRequest,
  validateArrheniusRequest,
  validateRequest,
  type AnyRequest,
  type ArrheniusRequest,
  type FitRequest,
  type FieldError,
  type ValidationResult,
} from "./request.ts";
export { runFit, DEFAULT_TOLERANCE_PCT, type FitResult, type LawComparison, type OrderComparison } from "./runFit.ts";
export { NOISE_CHOICES, type NoiseChoice, type NoiseModel } from "./noise.ts";
import { runFit as runOneFit, type FitResult } from "./runFit.ts";
import { runArrhenius, type ArrheniusResult } from "./arrhenius.ts";
import type { AnyRequest } from "./request.ts";

/** Runs a validated request of either kind: a run's fit, or the pooled Arrhenius fit over benches. */
export function runRequest(value: AnyRequest): FitResult | ArrheniusResult {
  return value.kind === "fit" ? runOneFit(value.request) : runArrhenius(value.request.arrhenius.benches);
}
export {
  RATE_LAWS,
  concentrationA,
  concentrationASensitivity,
  excessOfB,
  finalCA,
  isStoichiometric,
  lawFromOrders,
  limitingReagent,
  lineY,
  maxReactedA,
  modelName,
  rateConstantUnit,
  textbookLine,
  timeToReach,
  type Feed,
  type ModelName,
  type RateLaw,
} from "./rateLaws.ts";
export { MEASUREMENT_KINDS, measurementMap, fromCA, toCA, type Measurement, type AffineMap } from "./measurement.ts";
export { fitLine, type LineFit } from "./linearFit.ts";
export { fitNonlinear, type NonlinearFit, type NonlinearProblem } from "./nonlinearFit.ts";
export { GAS_CONSTANT, fitArrhenius, rateConstantAt, runArrhenius, type ArrheniusFit, type ArrheniusResult, type ArrheniusRun } from "./arrhenius.ts";
export type { Flag, FlagCode } from "./diagnostics.ts";
export { TIME_UNITS, CONCENTRATION_UNITS, type TimeUnit, type ConcentrationUnit } from "./units.ts";
