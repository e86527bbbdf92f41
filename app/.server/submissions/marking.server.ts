// Marking one stored version: the engine with the bench's feed and temperature and the
// practical's reaction system, both checks by the rubric, the late penalty; the result is stored
// with that version. An engine refusal is recorded (status "failed", shown to staff), never silent.
import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import { Submission } from "../db/submissions.server";
import type { MarkAttempt, MarkOutcome, RunInput } from "~/lib/marking/mark-run";
import { withCorrections, type CorrectionCost } from "~/lib/marking/corrections";
import { compute } from "../compute/pool.server";
import type { ConcentrationUnit, TimeUnit } from "~/lib/kinetics/units";
import { markingContext, practicalOfSubmission } from "./context.server";
import { trimFit } from "./service.server";
import { columnText } from "~/lib/readings/table";

type Attempt = (MarkOutcome & { correction?: CorrectionCost | null }) | Exclude<MarkAttempt, MarkOutcome>;

/**
 * The engine and rubric on a submission's stored readings (with its exclusions). A reviewer's
 * corrections are already in the stored fields (units, readings, exclusions); here they are
 * priced by the practical's policy and told in the feedback, at every re-mark.
 */
export async function computeMark(s: Submission, transaction?: Transaction): Promise<Attempt> {
  const practical = await practicalOfSubmission(s.sessionId, s.benchId, s.groupId);
  if (!practical) return { ok: false, errors: [{ path: "bench", message: "the group's bench in this practical no longer exists" }] };
  if (!s.readings) return { ok: false, errors: [{ path: "file", message: "no readings were read from the file" }] };
  void transaction;
  // the fit runs in the compute pool's worker threads
  const run: RunInput = {
    points: s.readings.points,
    rowNumbers: s.readings.rowNumbers,
    timeUnit: s.timeUnit as TimeUnit,
    concentrationUnit: s.concentrationUnit as ConcentrationUnit,
    measured: s.measured === "concentrationA" ? "concentrationA" : "session",
    reportedK: s.reportedK,
    reportedMethod: s.reportedMethod,
    late: s.late,
    excludedRows: (s.excluded ?? []).map((e) => e.row),
    columns: { time: columnText(s.readings.time), value: columnText(s.readings.value) },
    valueColumn: s.readings.value,
    final: s.readings.final,
  };
  const ctx = markingContext(practical);
  const attempt = await compute("mark", { ctx, run });
  return attempt.ok ? withCorrections(attempt, s.corrections ?? [], ctx.rubric) : attempt;
}

/** The columns a mark attempt sets on the submission. */
export function markColumns(attempt: Awaited<ReturnType<typeof computeMark>>) {
  if (!attempt.ok) {
    return {
      status: "failed" as const,
      markingError: attempt.errors.map((e) => (e.path ? `${e.path}: ${e.message}` : e.message)).join("; "),
      fit: null, flags: [], feedback: [], checks: null, experimentPart: null, analysisPart: null, latePenalty: null, autoMark: null,
    };
  }
  return {
    status: "marked" as const,
    markingError: null,
    fit: trimFit(attempt.result),
    flags: attempt.result.flags,
    feedback: attempt.feedback,
    checks: {
      kMarking: attempt.kMarking,
      kLine: attempt.kLine,
      kRefAtT: attempt.kRefAtT,
      experiment: attempt.experiment,
      analysis: attempt.analysis,
      rowNumbers: attempt.rowNumbers.length > 2000 ? [] : attempt.rowNumbers,
      notes: attempt.notes,
      analysisAgainst: attempt.analysisAgainst,
      kAnalysis: attempt.kAnalysis,
      ...("correction" in attempt && attempt.correction ? { correction: attempt.correction } : {}),
    },
    experimentPart: attempt.parts.experimentPart,
    analysisPart: attempt.parts.analysisPart,
    latePenalty: attempt.parts.latePenalty,
    autoMark: attempt.parts.mark,
  };
}

/**
 * The job's work. Marks a version once: the update is conditional on the status still being
 * "queued", so a job that runs twice (a worker stopped after marking, before it reported the job
 * done) does not mark it again.
 */
export async function markSubmission(submissionId: number): Promise<"marked" | "failed" | "skipped"> {
  const s = await Submission.findByPk(submissionId);
  if (!s || s.status !== "queued") return "skipped";
  let attempt: Awaited<ReturnType<typeof computeMark>>;
  try {
    attempt = await computeMark(s);
  } catch (error) {
    attempt = { ok: false, errors: [{ path: "engine", message: (error as Error).message }] };
  }
  const cols = markColumns(attempt);
  const [count] = await Submission.update(
    { ...cols, markedAt: new Date(), markingRuns: getSequelize().literal("marking_runs + 1") as unknown as number },
    { where: { id: submissionId, status: "queued" } },
  );
  return count === 0 ? "skipped" : cols.status;
}
