// One submission's run through the engine and the rubric: the bench's feed and temperature, the
// practical's reaction and reference, the group's readings and reported k in, the engine result,
// both checks, the mark and the feedback lines out. Pure: the marking job and the tests call it.
import { runFit, textbookLine, lawFromOrders, validateFitRequest, type FitRequest, type FitResult, type Measurement } from "../kinetics/index.ts";
import { molPerLitrePer, type ConcentrationUnit, type TimeUnit } from "../kinetics/units.ts";
import { analysisCheck, combine, experimentCheck, type CheckScore, type MarkParts } from "./marks.ts";
import { feedbackLines } from "./feedback.ts";
import { handLineK, markingK } from "./engine-result.ts";
import type { MarkingRubric } from "./rubric.ts";
import { withFileRows } from "./rows.ts";
import { engineErrorsText, readingKindProblem, type ColumnNames } from "./range-checks.ts";
import { concentrationFromTitre } from "../kinetics/titration.ts";
import { signalPlan, type FinalRow } from "./conductivity.ts";
import { readTitres, titreNote, type TitrationSetup, type ValueColumn } from "./titres.ts";

export interface MarkingContext {
  reaction: { a: number; b: number; orderA: number; orderB: number };
  /** the bench's feed, mol/L */
  feed: { CA0: number; CB0: number };
  temperatureC: number;
  /** what the practical measures; a group may always send concentrations of A instead */
  measurement: Measurement;
  /** per second, concentrations in mol/L */
  reference: { k: number; TrefC?: number; EaKJ?: number };
  rubric: MarkingRubric;
  /** a titration practical's calibration: the value column holds titres in mL unless the group converted them */
  titration?: TitrationSetup;
  /** a conductivity practical's stored conductivities (the final one is S∞ when the file has none) */
  conductivity?: { start?: number; end?: number };
}

export interface RunInput {
  points: [number, number][];
  /** file row of each point */
  rowNumbers: number[];
  timeUnit: TimeUnit;
  concentrationUnit: ConcentrationUnit;
  /** "concentrationA", or the practical's own measured quantity */
  measured: "concentrationA" | "session";
  reportedK: number | null;
  reportedMethod: string | null;
  late: boolean;
  /** file rows a reviewer left out */
  excludedRows: number[];
  /** how the time and value columns are named in messages ("column B (CA)") */
  columns?: ColumnNames;
  /** the value column as the file names it (letter, heading, unit), to tell titres from concentrations */
  valueColumn?: ValueColumn;
  /** a row marked as the final reading (∞, inf, final) */
  final?: FinalRow;
}

export interface MarkOutcome {
  ok: true;
  result: FitResult;
  experiment: CheckScore;
  analysis: CheckScore;
  parts: MarkParts;
  kMarking: number;
  kLine: number;
  kRefAtT: number;
  feedback: string[];
  /** file row of each point the engine saw (after exclusions), to name its flag rows */
  rowNumbers: number[];
  /** what the group's k was judged against, and that k */
  analysisAgainst: "line" | "curve";
  kAnalysis: number;
  /** how the readings were turned into the engine's measurement (titres converted, S0 and S∞ taken from ...) */
  notes: string[];
}

export type MarkAttempt = MarkOutcome | { ok: false; errors: Array<{ path: string; message: string }> };

/** The engine request for a group's readings at its bench (exclusions applied). */
export function buildRequest(ctx: MarkingContext, run: RunInput, withReference: boolean): { request: FitRequest; rowNumbers: number[]; notes: string[] } {
  const excluded = new Set(run.excludedRows);
  const points: [number, number][] = [];
  const rowNumbers: number[] = [];
  run.points.forEach((p, i) => {
    if (excluded.has(run.rowNumbers[i])) return;
    points.push(p);
    rowNumbers.push(run.rowNumbers[i]);
  });
  const notes: string[] = [];
  let concentrationUnit = run.concentrationUnit;
  if (run.measured === "session" && ctx.titration && points.length) {
    // titres in mL to the titrated species' concentration (mol/L), unless the group converted them
    const cal = ctx.titration;
    let first = 0;
    points.forEach((p, i) => (p[0] < points[first][0] ? (first = i) : 0));
    const start = cal.species === "A" ? ctx.feed.CA0 : ctx.feed.CB0;
    const reading = readTitres([points[first][1]], run.valueColumn, cal, start, run.concentrationUnit);
    notes.push(titreNote(reading, cal));
    if (reading.titres) {
      points.forEach((p, i) => (points[i] = [p[0], concentrationFromTitre(cal, p[1])]));
      concentrationUnit = "mol/L";
    }
  }
  const cs = molPerLitrePer(concentrationUnit);
  let measurement: Measurement = run.measured === "concentrationA" ? { kind: "concentrationA" } : ctx.measurement;
  let fitSignalStart = false;
  let pts = points;
  let rows = rowNumbers;
  if (measurement.kind === "signal" && !Number.isFinite(measurement.S0)) {
    // S0 and S∞ as the group measured them (conductivity.ts): a final reading is S∞ and no
    // reading of the run; S0 is fitted when the first reading came after mixing
    const final = run.final && !excluded.has(run.final.row) ? run.final : undefined;
    const plan = signalPlan(points, rowNumbers, final, measurement.Sinf ?? ctx.conductivity?.end, run.timeUnit);
    pts = plan.points;
    rows = plan.rowNumbers;
    fitSignalStart = plan.fitStart;
    notes.push(...plan.notes);
    measurement = { kind: "signal", S0: plan.S0, ...(plan.Sinf !== undefined ? { Sinf: plan.Sinf } : {}) };
  } else if (run.final) {
    notes.push(`Row ${run.final.row} ("${run.final.label}") was not used: a final reading is only read for a conductivity practical.`);
  }
  const request: FitRequest = {
    reaction: ctx.reaction,
    feed: { CA0: ctx.feed.CA0 / cs, CB0: ctx.feed.CB0 / cs },
    units: { time: run.timeUnit, concentration: concentrationUnit },
    measurement,
    points: pts,
    temperatureC: ctx.temperatureC,
  };
  if (fitSignalStart) request.options = { fitSignalStart: true };
  if (withReference) request.reference = { ...ctx.reference, tolerancePct: ctx.rubric.experiment.fullWithinPct };
  return { request, rowNumbers: rows, notes };
}

export type RangeCheck = { ok: true; request: FitRequest; rowNumbers: number[]; notes: string[] } | { ok: false; message: string; errors: Array<{ path: string; message: string }>; notes: string[] };

/**
 * The range checks (range-checks.ts): run when a file arrives, so that a file the marking job
 * would refuse is refused at once (422) with the same message, and again by the job. They look at
 * the engine's measurement, so titres are checked after conversion.
 */
export function rangeCheck(ctx: MarkingContext, run: RunInput, withReference = false): RangeCheck {
  const { request, rowNumbers, notes } = buildRequest(ctx, run, withReference);
  const kind = readingKindProblem(request, rowNumbers, run.columns);
  if (kind) return { ok: false, message: kind, errors: [{ path: "", message: kind }], notes };
  const checked = validateFitRequest(request);
  if (!checked.ok) {
    const message = engineErrorsText(checked.errors, rowNumbers, run.columns);
    return { ok: false, message, errors: [{ path: "", message }], notes };
  }
  return { ok: true, request: checked.request, rowNumbers, notes };
}

export function markRun(ctx: MarkingContext, run: RunInput): MarkAttempt {
  const checked = rangeCheck(ctx, run, true);
  if (!checked.ok) return { ok: false, errors: checked.errors };
  const { rowNumbers, notes } = checked;
  const result = runFit(checked.request);
  const kRefAtT = result.reference!.kAtT;
  const kMarking = markingK(result);
  const kLine = handLineK(result);
  const experiment = experimentCheck(kMarking, kRefAtT, ctx.rubric);
  // like with like: a k the group says came from a curve fit is judged against the engine's curve
  // fit; any other against the unweighted line of the textbook form for the feed
  const analysisAgainst: "line" | "curve" = run.reportedMethod === "curve-fit" && Number.isFinite(result.nonlinear.k) ? "curve" : "line";
  const kAnalysis = analysisAgainst === "curve" ? result.nonlinear.k : kLine;
  const analysis = analysisCheck(run.reportedK, kAnalysis, ctx.rubric);
  const parts = combine(experiment, analysis, ctx.rubric, run.late);
  const law = lawFromOrders(ctx.reaction.orderA, ctx.reaction.orderB)!;
  const nu = ctx.reaction.a > 0 ? ctx.reaction.b / ctx.reaction.a : 1;
  const expectedForm = textbookLine(law, { CA0: ctx.feed.CA0, CB0: ctx.feed.CB0, nu }).y;
  const feedback = feedbackLines({
    flags: result.flags,
    rowNumbers,
    experiment,
    analysis,
    reportedK: run.reportedK,
    reportedMethod: run.reportedMethod,
    expectedForm,
    late: run.late,
    excludedRows: run.excludedRows,
    values: [...checked.request.points].sort((a, b) => a[0] - b[0]).map((p) => p[1]),
    analysisAgainst,
  });
  // The group's own method is judged here, not by the engine: a flag so reviewers see it in the queue.
  const method = run.reportedMethod;
  if (method && method !== expectedForm && ["ln(CA0/CA)", "1/CA - 1/CA0", "ln[(CB*CA0)/(CB0*CA)]"].includes(method)) {
    result.flags.push({
      code: "wrong-line-form" as FitResult["flags"][number]["code"],
      message: `The group reports a k from ${method.replace(/\*/g, "·")} against t; this feed and rate law call for ${expectedForm.replace(/\*/g, "·")}.`,
      rows: [],
    });
  }
  // flags name the file's own rows from here on (stored, shown to staff, exported)
  result.flags = withFileRows(result.flags, rowNumbers);
  return { ok: true, result, experiment, analysis, parts, kMarking, kLine, kRefAtT, feedback, rowNumbers, notes, analysisAgainst, kAnalysis };
}

/** The preview a group sees before submitting: the same fit with no reference value anywhere in it. */
export function previewRun(ctx: MarkingContext, run: Omit<RunInput, "late" | "excludedRows" | "reportedK" | "reportedMethod">): { ok: true; result: FitResult; rowNumbers: number[]; notes: string[] } | { ok: false; message: string; errors: Array<{ path: string; message: string }>; notes: string[] } {
  const checked = rangeCheck(ctx, { ...run, late: false, excludedRows: [], reportedK: null, reportedMethod: null });
  if (!checked.ok) return checked;
  const result = runFit(checked.request);
  result.flags = withFileRows(result.flags, checked.rowNumbers);
  return { ok: true, result, rowNumbers: checked.rowNumbers, notes: checked.notes };
}
