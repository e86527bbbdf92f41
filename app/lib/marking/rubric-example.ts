// What a rubric gives typical runs, worked out by the real marking (simulated readings through the
// engine, both checks, the weights, the correction policy), so the planning form can show an
// instructor the consequences of the rubric being edited. The runs are invented.
import { markRun, type MarkingContext } from "./mark-run.ts";
import { simulateRun, type Mistake } from "./simulate.ts";
import { withCorrections, type Correction } from "./corrections.ts";
import type { MarkingRubric } from "./rubric.ts";

export interface ExampleReaction {
  a: number;
  b: number;
  orderA: number;
  orderB: number;
  /** per second, mol/L, at TrefC */
  kRef: number;
  TrefC: number;
}

export interface RubricExample {
  key: "perfect" | "wrong-line" | "unit-slip" | "unit-slip-corrected";
  label: string;
  experimentPart: number;
  analysisPart: number;
  correctionCost: number;
  mark: number;
}

const CASES: Array<{ key: RubricExample["key"]; label: string; mistake: Mistake; corrected?: boolean }> = [
  { key: "perfect", label: "A careful run, k from the right straight line", mistake: "none" },
  { key: "wrong-line", label: "Good readings, k from the wrong straight line", mistake: "wrong-line" },
  { key: "unit-slip", label: "mmol/L readings uploaded as mol/L", mistake: "mmol-as-mol" },
  { key: "unit-slip-corrected", label: "The same unit slip, corrected to mmol/L by a reviewer", mistake: "mmol-as-mol", corrected: true },
];

/** An invented bench: CA0 0.01 mol/L, feed ratio M = 1.5, at the reference temperature. */
export function exampleContext(reaction: ExampleReaction, rubric: MarkingRubric): MarkingContext {
  const nu = reaction.a > 0 ? reaction.b / reaction.a : 1;
  const CA0 = 0.01;
  return {
    reaction: { a: reaction.a, b: reaction.b, orderA: reaction.orderA, orderB: reaction.orderB },
    feed: { CA0, CB0: 1.5 * nu * CA0 },
    temperatureC: reaction.TrefC,
    measurement: { kind: "concentrationA" },
    reference: { k: reaction.kRef, TrefC: reaction.TrefC },
    rubric,
  };
}

/** The marks of the four example runs under `rubric`, on time. */
export function rubricExamples(reaction: ExampleReaction, rubric: MarkingRubric): RubricExample[] {
  const ctx = exampleContext(reaction, rubric);
  return CASES.map((c, i) => {
    const run = simulateRun({ reaction: ctx.reaction, feed: ctx.feed, k: reaction.kRef, n: 16, noise: 0.004, seed: 1701 + i, mistake: c.mistake });
    const corrections: Correction[] = c.corrected ? [{ kind: "concentration-unit", from: run.concentrationUnit, to: "mmol/L", reason: "", byId: null, at: "" }] : [];
    const attempt = markRun(ctx, {
      points: run.rows.map((r) => [r[0], r[1]] as [number, number]),
      rowNumbers: run.rows.map((_, j) => j + 2),
      timeUnit: run.timeUnit,
      concentrationUnit: c.corrected ? "mmol/L" : run.concentrationUnit,
      measured: "concentrationA",
      reportedK: run.reportedK,
      reportedMethod: run.reportedMethod,
      late: false,
      excludedRows: [],
    });
    if (!attempt.ok) return { key: c.key, label: c.label, experimentPart: 0, analysisPart: 0, correctionCost: 0, mark: 0 };
    const priced = withCorrections(attempt, corrections, rubric);
    return {
      key: c.key,
      label: c.label,
      experimentPart: priced.parts.experimentPart,
      analysisPart: priced.parts.analysisPart,
      correctionCost: priced.correction?.marks ?? 0,
      mark: priced.parts.mark,
    };
  });
}
