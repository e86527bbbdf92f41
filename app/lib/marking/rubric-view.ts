// A rubric as a person reads it: each check's share as marks out of 100 and a part as
// "30 of 30 marks". Pure; the planning form, the review and the feedback page use it.
import { sig } from "../format.ts";
import type { MarkingRubric } from "./rubric.ts";

/** Marks out of 100 each check carries (the weights normalised, as `combine` does). */
export function marksOutOf(rubric: MarkingRubric): { experiment: number; analysis: number } {
  const total = rubric.experiment.weight + rubric.analysis.weight;
  const experiment = total > 0 ? (100 * rubric.experiment.weight) / total : 50;
  return { experiment: round2(experiment), analysis: round2(100 - experiment) };
}

/** "30 of 30 marks", "12.5 of 40 marks". */
export function partText(got: number | null | undefined, outOf: number): string {
  if (got === null || got === undefined || !Number.isFinite(got)) return `— of ${sig(outOf, 4)} marks`;
  return `${sig(got, 4)} of ${sig(outOf, 4)} marks`;
}

function round2(x: number): number {
  return Math.round(x * 100) / 100;
}
