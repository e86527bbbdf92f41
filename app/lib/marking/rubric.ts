// How a practical's marks are split and how close is close enough. Stored as JSON with the
// practical; read here with defaults, so a rubric written by hand or an older one still works.

export interface CheckBands {
  /** share of the practical's marks this check carries (any scale; the two are normalised) */
  weight: number;
  /** full marks when the deviation is within this many percent */
  fullWithinPct: number;
  /** partial marks when the deviation is within this many percent */
  partialWithinPct: number;
  /** the share of this check's marks given in the partial band (0-1) */
  partialFraction: number;
}

export interface MarkingRubric {
  /** the engine's marking k against the reference k at the bench's temperature */
  experiment: CheckBands;
  /** the group's reported k against the k their own straight line gives */
  analysis: CheckBands;
  /** percent of the mark taken off a late submission */
  latePenaltyPct: number;
  /** percent of the mark taken off for each slip a reviewer corrected (unit, columns, a reading) */
  correctionCostPct: number;
}

// Defaults: common practice, no source (a tenth for the experiment, a few percent for arithmetic).
export const DEFAULT_RUBRIC: MarkingRubric = {
  experiment: { weight: 60, fullWithinPct: 10, partialWithinPct: 25, partialFraction: 0.5 },
  analysis: { weight: 40, fullWithinPct: 2, partialWithinPct: 10, partialFraction: 0.5 },
  latePenaltyPct: 10,
  correctionCostPct: 10,
};

type Obj = Record<string, unknown>;
const isObj = (v: unknown): v is Obj => typeof v === "object" && v !== null && !Array.isArray(v);
const num = (v: unknown, fallback: number, ok: (x: number) => boolean = (x) => x >= 0) =>
  typeof v === "number" && Number.isFinite(v) && ok(v) ? v : typeof v === "string" && v.trim() !== "" && Number.isFinite(Number(v)) && ok(Number(v)) ? Number(v) : fallback;

function bands(v: unknown, d: CheckBands, aliases: { weight?: string[]; full?: string[]; partial?: string[] } = {}): CheckBands {
  const o = isObj(v) ? v : {};
  const pick = (keys: string[]) => keys.map((k) => o[k]).find((x) => x !== undefined);
  const full = num(pick(["fullWithinPct", "fullPct", "full", ...(aliases.full ?? [])]), d.fullWithinPct, (x) => x > 0);
  return {
    weight: num(pick(["weight", "marks", "weightPct", ...(aliases.weight ?? [])]), d.weight),
    fullWithinPct: full,
    partialWithinPct: Math.max(full, num(pick(["partialWithinPct", "partialPct", "partial", ...(aliases.partial ?? [])]), d.partialWithinPct, (x) => x > 0)),
    partialFraction: num(pick(["partialFraction", "partialCredit"]), d.partialFraction, (x) => x >= 0 && x <= 1),
  };
}

/**
 * The rubric from a practical's stored JSON (any missing part takes its default). Two shapes are
 * read: nested ({ experiment: {...}, analysis: {...} }) and the planning form's flat one
 * ({ fullWithinPct, partialWithinPct, partialFraction, experimentWeight, analysisWeight,
 * latePenaltyPct }), whose bands are the experiment check's; the analysis check then keeps its
 * own default bands unless analysisFullWithinPct / analysisPartialWithinPct are given.
 * correctionCostPct is the practical's price of a slip a reviewer corrected.
 */
export function rubricFrom(json: unknown): MarkingRubric {
  const o = isObj(json) ? json : {};
  const flatExperiment = { fullWithinPct: o.fullWithinPct, partialWithinPct: o.partialWithinPct, partialFraction: o.partialFraction, weight: o.experimentWeight };
  const flatAnalysis = { fullWithinPct: o.analysisFullWithinPct, partialWithinPct: o.analysisPartialWithinPct, partialFraction: o.analysisPartialFraction, weight: o.analysisWeight };
  return {
    experiment: bands(o.experiment ?? o.experimentCheck ?? flatExperiment, DEFAULT_RUBRIC.experiment),
    analysis: bands(o.analysis ?? o.analysisCheck ?? flatAnalysis, DEFAULT_RUBRIC.analysis),
    latePenaltyPct: num(o.latePenaltyPct ?? o.latePenalty, DEFAULT_RUBRIC.latePenaltyPct, (x) => x >= 0 && x <= 100),
    correctionCostPct: num(o.correctionCostPct, DEFAULT_RUBRIC.correctionCostPct, (x) => x >= 0 && x <= 100),
  };
}
