// Storing a group's upload: the original bytes, the submission row and its marking job in one
// transaction, so none exists without the others. Also the preview (parse and fit, nothing stored).
import { createHash } from "node:crypto";
import { data } from "react-router";
import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import type { User } from "../db/models.server";
import { Submission, SubmissionFile, type StoredReadings } from "../db/submissions.server";
import { enqueue } from "../jobs/queue.server";
import { contentTypeOf } from "../readings/read.server";
import type { UploadedFile } from "./upload.server";
import { markingContext, practicalFor, type PracticalOfGroup } from "./context.server";
import type { ReadingProblem } from "~/lib/readings/extract";
import { columnText } from "~/lib/readings/table";
import { parseStart } from "~/lib/readings/clock-times";
import { compute } from "../compute/pool.server";
import type { ParsedUpload, UploadChoices } from "./parse.server";
import { runPlots, type RunPlots } from "~/lib/marking/plots";
import { REPORTED_METHODS } from "~/lib/marking/feedback";
import { CONCENTRATION_UNITS, TIME_UNITS, type ConcentrationUnit, type TimeUnit } from "~/lib/kinetics/units";
import type { FitResult } from "~/lib/kinetics";

export type { ParsedUpload, ParseOutcome, UploadChoices } from "./parse.server";

export interface FieldProblem {
  path: string;
  message: string;
}

/** The upload form's fields, checked; every problem with the field it is in. */
export function readChoices(fields: Record<string, string>, sessionMeasured: string | null): { choices: UploadChoices; problems: FieldProblem[] } {
  const problems: FieldProblem[] = [];
  const text = (k: string) => (fields[k] ?? "").trim();
  const measuredRaw = text("measured");
  let measured: UploadChoices["measured"] = "session";
  if (measuredRaw === "concentrationA") measured = "concentrationA";
  else if (measuredRaw && measuredRaw !== "session" && measuredRaw !== sessionMeasured) {
    problems.push({ path: "measured", message: `must be "concentrationA"${sessionMeasured ? ` or this practical's "${sessionMeasured}"` : ""}, not "${measuredRaw.slice(0, 40)}"` });
  }
  const timeUnit = text("timeUnit");
  if (timeUnit && !(TIME_UNITS as readonly string[]).includes(timeUnit)) problems.push({ path: "timeUnit", message: `must be one of ${TIME_UNITS.join(", ")}` });
  const concentrationUnit = text("concentrationUnit");
  if (concentrationUnit && !(CONCENTRATION_UNITS as readonly string[]).includes(concentrationUnit)) problems.push({ path: "concentrationUnit", message: `must be one of ${CONCENTRATION_UNITS.join(", ")}` });
  let reportedK: number | null = null;
  const kText = text("reportedK").replace(",", ".").replace(/\u2212/g, "-").replace(/\s*[×x]\s*10\^?([−-]?\d+)/, "e$1").replace("−", "-");
  if (kText) {
    const k = Number(kText);
    if (!Number.isFinite(k) || k <= 0) problems.push({ path: "reportedK", message: `must be a positive number (per second), not "${text("reportedK").slice(0, 30)}"` });
    else reportedK = k;
  }
  const method = text("reportedMethod");
  if (method && !(method in REPORTED_METHODS)) problems.push({ path: "reportedMethod", message: `must be one of ${Object.keys(REPORTED_METHODS).join(", ")}` });
  const startText = text("startTime");
  const startTime = startText ? parseStart(startText) : null;
  if (startText && startTime === null) problems.push({ path: "startTime", message: `must be the clock time of mixing as hh:mm or hh:mm:ss (e.g. 14:02:30), not "${startText.slice(0, 30)}"` });
  const sessionText = text("sessionId");
  const sessionId = sessionText ? Number(sessionText) : null;
  if (sessionText && !(Number.isInteger(sessionId) && sessionId! > 0)) problems.push({ path: "sessionId", message: "must be a practical's id" });
  return {
    choices: {
      timeColumn: text("timeColumn") || undefined,
      valueColumn: text("valueColumn") || undefined,
      measured,
      timeUnit: (timeUnit || undefined) as TimeUnit | undefined,
      concentrationUnit: (concentrationUnit || undefined) as ConcentrationUnit | undefined,
      reportedK,
      reportedMethod: method || null,
      sessionId,
      startTime,
    },
    problems,
  };
}

function badRequest(problems: FieldProblem[], api: boolean): never {
  if (api) throw Response.json({ errors: problems }, { status: 400 });
  throw data({ message: problems.map((p) => `${p.path}: ${p.message}`).join("; ") }, { status: 400 });
}

export interface Preview {
  columns: ParsedUpload["columns"];
  time: StoredReadings["time"] | null;
  value: StoredReadings["value"] | null;
  timeUnit: TimeUnit | null;
  concentrationUnit: ConcentrationUnit | null;
  refused: string | null;
  problems: ReadingProblem[];
  notes: string[];
  /** the plots, built here from every reading (each thinned for drawing) */
  plots: RunPlots | null;
  n: number;
  fit: FitResult | null;
  fitErrors: FieldProblem[];
  expectedLine: string;
}
const PREVIEW_POINTS = 400;

export function thin<T>(xs: T[], max: number): T[] {
  if (xs.length <= max) return xs;
  const step = xs.length / max;
  return Array.from({ length: max }, (_, i) => xs[Math.floor(i * step)]);
}

/** Parse and fit without storing anything; no reference value is in the answer. */
export async function previewUpload(practical: PracticalOfGroup, file: UploadedFile | null, fields: Record<string, string>, api: boolean): Promise<Preview> {
  const { choices, problems } = readChoices(fields, practical.system.measured);
  if (!file) badRequest([{ path: "file", message: "is required: choose the readings file (CSV or .xlsx)" }], api);
  if (problems.length) badRequest(problems, api);
  // Reading the file and the fit run in the compute pool's worker threads.
  const { parsed, fit } = await compute("preview", { file, choices, measured: practical.system.measured, ctx: markingContext(practical) });
  const base: Preview = {
    columns: parsed.columns, time: null, value: null, timeUnit: null, concentrationUnit: null, refused: null, problems: [], notes: [],
    plots: null, n: 0, fit: null, fitErrors: [], expectedLine: "",
  };
  if (!parsed.ok || !fit) return { ...base, refused: parsed.ok ? null : parsed.message };
  // what the upload would refuse, the preview refuses with the same words (and the page will not send it)
  if (!fit.ok) return { ...base, time: parsed.readings.time, value: parsed.readings.value, timeUnit: parsed.timeUnit, concentrationUnit: parsed.concentrationUnit, problems: parsed.problems, notes: [...parsed.readings.notes, ...fit.notes], n: parsed.readings.points.length, refused: fit.message };
  const result = fit.ok ? trimFit(fit.result) : null;
  return {
    ...base,
    time: parsed.readings.time,
    value: parsed.readings.value,
    timeUnit: parsed.timeUnit,
    concentrationUnit: parsed.concentrationUnit,
    problems: parsed.problems,
    notes: [...parsed.readings.notes, ...fit.notes],
    plots: result ? runPlots(result, parsed.readings.points) : null,
    n: parsed.readings.points.length,
    fit: result,
    fitErrors: [],
    expectedLine: result?.line.form ?? "",
  };
}

/** A fit result small enough to send: per-row arrays thinned for plotting. */
export function trimFit(result: FitResult): FitResult {
  if (result.nonlinear.residuals.length <= PREVIEW_POINTS && result.line.rows.length <= PREVIEW_POINTS) return result;
  const idx = thin(Array.from({ length: result.nonlinear.residuals.length }, (_, i) => i), PREVIEW_POINTS);
  const lineIdx = thin(Array.from({ length: result.line.rows.length }, (_, i) => i), PREVIEW_POINTS);
  return {
    ...result,
    nonlinear: { ...result.nonlinear, residuals: idx.map((i) => result.nonlinear.residuals[i]), residualRows: idx } as FitResult["nonlinear"],
    line: { ...result.line, rows: lineIdx.map((i) => result.line.rows[i]), residuals: lineIdx.map((i) => result.line.residuals[i]) },
  };
}

export interface Created {
  id: number;
  version: number;
  status: "queued" | "refused";
  late: boolean;
  problems: ReadingProblem[];
  message?: string;
}

/**
 * Stores one upload as the group's next version: row, original bytes and (when it can be marked)
 * its marking job in one transaction. A refused file is stored too (status "refused"), so what
 * was sent can always be looked at again.
 */
export async function createSubmission(user: User, groupId: number, file: UploadedFile | null, fields: Record<string, string>, api: boolean): Promise<Created> {
  if (!file) badRequest([{ path: "file", message: "is required: choose the readings file (CSV or .xlsx)" }], api);
  const sessionField = (fields.sessionId ?? "").trim();
  const practical = await practicalFor(groupId, sessionField && /^\d+$/.test(sessionField) ? Number(sessionField) : null);
  if (!practical) {
    const message = "This group has no bench in a practical yet, so there is nothing to upload for. Ask your instructor.";
    if (api) throw Response.json({ errors: [{ path: "", message }] }, { status: 409 });
    throw data({ message }, { status: 409 });
  }
  const { choices, problems } = readChoices(fields, practical.system.measured);
  if (problems.length) badRequest(problems, api);
  // reading the file and its range checks run in the compute pool's worker threads
  const parsed = await compute("parse", { file, choices, measured: practical.system.measured, ctx: markingContext(practical) });
  const sha256 = createHash("sha256").update(file.bytes).digest("hex");
  const now = new Date();
  const late = practical.session.deadline ? now > practical.session.deadline : false;
  const status = parsed.ok ? "queued" : "refused";
  const readingProblems: ReadingProblem[] = parsed.ok ? parsed.problems : [{ row: 0, column: "", message: parsed.message }];
  return getSequelize().transaction(async (transaction: Transaction) => {
    // One version number per upload, even when two members upload at once.
    await getSequelize().query("select id from groups where id = :groupId for update", { replacements: { groupId }, transaction });
    const last = (await Submission.max("version", { where: { groupId, sessionId: practical.session.id }, transaction })) as number | null;
    const version = (last ?? 0) + 1;
    const submission = await Submission.create(
      {
        groupId,
        sessionId: practical.session.id,
        benchId: practical.bench.id,
        version,
        submittedById: user.id,
        submittedAt: now,
        late,
        status,
        timeColumn: choices.timeColumn ?? null,
        valueColumn: choices.valueColumn ?? null,
        measured: choices.measured === "concentrationA" ? "concentrationA" : practical.system.measured,
        timeUnit: parsed.ok ? parsed.timeUnit : (choices.timeUnit ?? "s"),
        concentrationUnit: parsed.ok ? parsed.concentrationUnit : (choices.concentrationUnit ?? "mol/L"),
        reportedK: choices.reportedK,
        reportedMethod: choices.reportedMethod,
        problems: readingProblems,
        readings: parsed.ok ? parsed.readings : null,
      },
      { transaction },
    );
    await SubmissionFile.create(
      {
        submissionId: submission.id,
        bytes: Buffer.from(file.bytes.buffer, file.bytes.byteOffset, file.bytes.byteLength),
        size: file.bytes.byteLength,
        sha256,
        contentType: contentTypeOf(file.bytes, file.name, file.type),
        originalName: file.name.slice(0, 255),
      },
      { transaction },
    );
    if (status === "queued") await enqueue("mark-submission", { submissionId: submission.id }, { transaction });
    return { id: submission.id, version, status, late, problems: readingProblems, message: parsed.ok ? undefined : parsed.message };
  });
}

/** Names a problem for people: "row 7, column B (kappa): ..." */
export function problemText(p: ReadingProblem): string {
  if (!p.row) return p.message;
  return `Row ${p.row}${p.column ? `, column ${p.column}` : ""}: ${p.message}`;
}

export { columnText };
