// The two rate constants marking needs from an engine result, in one place so a change of the
// engine's contract touches only this file. Marking k: the engine's k (its best straight line).
// Hand-method k: the plain least-squares line a group would draw, `result.line.k` when the engine
// reports it separately, else the engine's straight-line k (the same line until then).
import type { FitResult } from "../kinetics/index.ts";

export function markingK(result: FitResult): number {
  return result.k;
}

export function handLineK(result: FitResult): number {
  const line = result.line as FitResult["line"] & { k?: number };
  return typeof line.k === "number" && Number.isFinite(line.k) ? line.k : result.k;
}

export function handLineCI95(result: FitResult): [number, number] {
  const line = result.line as FitResult["line"] & { kCI95?: [number, number] };
  return line.kCI95 ?? result.kCI95;
}
