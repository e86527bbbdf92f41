// The arithmetic of a mark: two checks scored by the rubric's bands, weighted, less a late
// penalty. Pure functions, worked by hand in marks.test.ts.
import type { CheckBands, MarkingRubric } from "./rubric.ts";

export type Band = "full" | "partial" | "none";

export interface CheckScore {
  /** signed deviation in percent of the value compared against; NaN when it cannot be computed */
  deviationPct: number;
  band: Band;
  /** 0-1 of this check's marks */
  score: number;
}

/** Signed deviation of `value` from `against`, in percent of `against`. */
export function deviationPct(value: number, against: number): number {
  if (!Number.isFinite(value) || !Number.isFinite(against) || against === 0) return NaN;
  return ((value - against) / against) * 100;
}

/** Full marks within the first band, the partial share within the second, none beyond (or when unknown). */
export function scoreBand(devPct: number, bands: CheckBands): CheckScore {
  const a = Math.abs(devPct);
  if (!Number.isFinite(a)) return { deviationPct: devPct, band: "none", score: 0 };
  if (a <= bands.fullWithinPct) return { deviationPct: devPct, band: "full", score: 1 };
  if (a <= bands.partialWithinPct) return { deviationPct: devPct, band: "partial", score: bands.partialFraction };
  return { deviationPct: devPct, band: "none", score: 0 };
}

/** Experiment check: the engine's marking k against the reference k at the bench's temperature. */
export function experimentCheck(kMarking: number, kRefAtT: number, rubric: MarkingRubric): CheckScore {
  return scoreBand(deviationPct(kMarking, kRefAtT), rubric.experiment);
}

/** Analysis check: the group's reported k against the k of the hand-method line on their own data. */
export function analysisCheck(reportedK: number | null, kLine: number, rubric: MarkingRubric): CheckScore {
  if (reportedK === null) return { deviationPct: NaN, band: "none", score: 0 };
  return scoreBand(deviationPct(reportedK, kLine), rubric.analysis);
}

export interface MarkParts {
  /** percent of the practical's marks from each check, after weighting, before the late penalty */
  experimentPart: number;
  analysisPart: number;
  /** percent taken off for lateness */
  latePenalty: number;
  /** 0-100 */
  mark: number;
}

/** Weighted sum of the checks in percent of the whole, then the late penalty as a share of it. */
export function combine(experiment: CheckScore, analysis: CheckScore, rubric: MarkingRubric, late: boolean): MarkParts {
  const total = rubric.experiment.weight + rubric.analysis.weight;
  const we = total > 0 ? rubric.experiment.weight / total : 0.5;
  const wa = total > 0 ? rubric.analysis.weight / total : 0.5;
  const experimentPart = 100 * we * experiment.score;
  const analysisPart = 100 * wa * analysis.score;
  const before = experimentPart + analysisPart;
  const latePenalty = late ? (before * rubric.latePenaltyPct) / 100 : 0;
  return { experimentPart: round2(experimentPart), analysisPart: round2(analysisPart), latePenalty: round2(latePenalty), mark: round2(Math.max(0, before - latePenalty)) };
}

function round2(x: number): number {
  return Math.round(x * 100) / 100;
}
