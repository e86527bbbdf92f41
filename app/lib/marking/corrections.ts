// A reviewer's stated correction of a group's slip (a unit, the columns, a reading left out): what
// it is in words for staff and for the group, and what the practical's policy charges for it.
// The mark itself is always worked out again by the engine from the corrected readings; this
// module only prices the slip. Pure: the marking service, the planning form's example and the
// tests use it.
import type { MarkOutcome } from "./mark-run.ts";
import type { MarkingRubric } from "./rubric.ts";

export const CORRECTION_KINDS = ["concentration-unit", "time-unit", "swapped-columns", "columns", "reading-left-out"] as const;
export type CorrectionKind = (typeof CORRECTION_KINDS)[number];

/** What a reviewer chooses in the correction form, in words. */
export const CORRECTION_LABELS: Record<CorrectionKind, string> = {
  "concentration-unit": "The concentration unit is another",
  "time-unit": "The time unit is another",
  "swapped-columns": "Time and value columns are swapped",
  columns: "Other columns are the time and the value",
  "reading-left-out": "A reading should be left out",
};

export interface Correction {
  kind: CorrectionKind;
  /** what the upload said (a unit, "A, B" for columns, the file row for a reading) */
  from: string;
  /** what the reviewer says it is */
  to: string;
  reason: string;
  byId: number | null;
  at: string;
}

/** "concentration unit mol/L → mmol/L", "time column A → B, value column B → A", "row 7 left out". */
export function correctionText(c: Pick<Correction, "kind" | "from" | "to">): string {
  switch (c.kind) {
    case "concentration-unit":
      return `concentration unit ${c.from} → ${c.to}`;
    case "time-unit":
      return `time unit ${c.from} → ${c.to}`;
    case "swapped-columns":
    case "columns": {
      const [ft, fv] = c.from.split(",").map((x) => x.trim());
      const [tt, tv] = c.to.split(",").map((x) => x.trim());
      return `time column ${ft} → ${tt}, value column ${fv} → ${tv}`;
    }
    case "reading-left-out":
      return `row ${c.to} of the file left out`;
  }
}

export interface CorrectionCost {
  /** corrections charged */
  count: number;
  /** the practical's price of one, percent of the mark */
  pctEach: number;
  /** marks taken off (out of 100) */
  marks: number;
}

/**
 * The practical's policy: each corrected slip takes `correctionCostPct` percent of the mark
 * (after the late penalty), at most the whole mark. Common practice, no source: a slip a marker
 * had to fix costs something, but far less than the zero the wrong number would have earned.
 */
export function correctionCost(mark: number, rubric: Pick<MarkingRubric, "correctionCostPct">, count: number): CorrectionCost {
  const share = Math.min(1, (rubric.correctionCostPct * count) / 100);
  return { count, pctEach: rubric.correctionCostPct, marks: round2(Math.max(0, mark) * share) };
}

/** The line the group reads about its corrections (none when there are none). */
export function correctionFeedback(corrections: readonly Correction[], cost: CorrectionCost): string[] {
  if (!corrections.length) return [];
  const what = corrections.map((c) => `${correctionText(c)}${c.reason ? ` (${c.reason})` : ""}`).join("; ");
  const price = cost.pctEach > 0 ? ` This practical charges ${round2(cost.pctEach)} % of the mark for each corrected slip: ${round2(cost.marks)} marks here.` : " This practical does not charge for a corrected slip.";
  return [`A reviewer corrected your upload: ${what}. Your mark was worked out again from the corrected readings.${price}`];
}

/** A mark attempt with the corrections priced and told: the mark less the cost, one more feedback line. */
export function withCorrections<T extends MarkOutcome>(attempt: T, corrections: readonly Correction[], rubric: MarkingRubric): T & { correction: CorrectionCost | null } {
  if (!corrections.length) return { ...attempt, correction: null };
  const cost = correctionCost(attempt.parts.mark, rubric, corrections.length);
  return {
    ...attempt,
    parts: { ...attempt.parts, mark: round2(Math.max(0, attempt.parts.mark - cost.marks)) },
    feedback: [...attempt.feedback, ...correctionFeedback(corrections, cost)],
    correction: cost,
  };
}

function round2(x: number): number {
  return Math.round(x * 100) / 100;
}
