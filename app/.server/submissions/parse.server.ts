// Reading an uploaded readings file into points: the file's format from its content (CSV or
// .xlsx), the columns and units as chosen or guessed. No database here: it runs in the compute
// pool's worker threads (app/.server/compute/), as a large file takes a while.
import type { StoredReadings } from "../db/submissions.server";
import { readReadingsFile } from "../readings/read.server";
import type { UploadedFile } from "./upload.server";
import { Refusal } from "~/lib/readings/csv";
import { extractPoints, guessColumns, timeUnitFrom, concentrationUnitFrom, type ReadingProblem } from "~/lib/readings/extract";
import { columnText, describeTable, numericColumns } from "~/lib/readings/table";
import { rangeCheck, type MarkingContext } from "~/lib/marking/mark-run";
import type { ConcentrationUnit, TimeUnit } from "~/lib/kinetics/units";

/** Words a column header may use for what the practical measures, to guess the value column. */
export function valueHints(measured: string): string[] {
  switch (measured) {
    case "conductivity": return ["kappa", "κ", "conductivity", "cond", "mS", "µS", "uS"];
    case "absorbance": return ["abs", "A (", "absorbance", "OD"];
    case "titration": return ["titre", "titer", "V", "volume", "c"];
    default: return ["CA", "c_A", "[A]", "conc", "c ("];
  }
}

/** The upload form's fields, checked; every problem with the field it is in. */
export interface UploadChoices {
  timeColumn: string | undefined;
  valueColumn: string | undefined;
  measured: "concentrationA" | "session";
  timeUnit: TimeUnit | undefined;
  concentrationUnit: ConcentrationUnit | undefined;
  reportedK: number | null;
  reportedMethod: string | null;
  sessionId: number | null;
  /** the clock time of mixing (seconds after midnight), for readings written as clock times */
  startTime: number | null;
}

export interface ParsedUpload {
  ok: true;
  readings: StoredReadings;
  problems: ReadingProblem[];
  timeUnit: TimeUnit;
  concentrationUnit: ConcentrationUnit;
  columns: Array<{ number: number; letter: string; header: string; unit: string; numeric: boolean }>;
}
export type ParseOutcome = ParsedUpload | { ok: false; message: string; columns: ParsedUpload["columns"] };

/** Reads the file and picks the columns and units (as chosen, else guessed from the header). */
export async function parseUpload(file: UploadedFile, choices: UploadChoices, measured: string): Promise<ParseOutcome> {
  let columns: ParsedUpload["columns"] = [];
  try {
    const table = await readReadingsFile(file.bytes, file.name, { start: choices.startTime });
    const shape = describeTable(table);
    if (shape) {
      const numeric = new Set(numericColumns(shape).map((c) => c.index));
      columns = shape.columns.map((c) => ({ number: c.index + 1, letter: c.letter, header: c.header, unit: c.unit, numeric: numeric.has(c.index) }));
    }
    const hints = choices.measured === "concentrationA" ? valueHints("concentration") : valueHints(measured);
    const ex = extractPoints(table, { time: choices.timeColumn, value: choices.valueColumn, valueHints: hints }, file.name);
    const guess = guessColumns(ex.shape, hints);
    const timeUnit = choices.timeUnit ?? timeUnitFrom(ex.time.unit) ?? "s";
    const concentrationUnit = choices.concentrationUnit ?? concentrationUnitFrom(ex.value.unit) ?? (guess?.concentrationUnit ?? "mol/L");
    const col = (c: typeof ex.time) => ({ letter: c.letter, header: c.header, unit: c.unit });
    return {
      ok: true,
      readings: { points: ex.points, rowNumbers: ex.rowNumbers, time: col(ex.time), value: col(ex.value), notes: ex.notes, ...(ex.final ? { final: ex.final } : {}) },
      problems: ex.problems,
      timeUnit,
      concentrationUnit,
      columns,
    };
  } catch (error) {
    if (error instanceof Refusal) return { ok: false, message: error.message, columns };
    throw error;
  }
}

/** The engine's view of what was read: the pairs, their rows and units, the columns' names. */
export function runOf(parsed: ParsedUpload, choices: UploadChoices) {
  const name = (c: StoredReadings["time"]) => columnText(c);
  return {
    points: parsed.readings.points,
    rowNumbers: parsed.readings.rowNumbers,
    timeUnit: parsed.timeUnit,
    concentrationUnit: parsed.concentrationUnit,
    measured: choices.measured,
    columns: { time: name(parsed.readings.time), value: name(parsed.readings.value) },
    valueColumn: parsed.readings.value,
    final: parsed.readings.final,
  };
}

/**
 * The file read and range-checked as the marking job will check it (mark-run.ts rangeCheck): a
 * file the job would refuse is refused now, with the same message, instead of waiting for ever.
 */
export async function uploadChecked(ctx: MarkingContext, file: UploadedFile, choices: UploadChoices, measured: string): Promise<ParseOutcome> {
  const parsed = await parseUpload(file, choices, measured);
  if (!parsed.ok) return parsed;
  const checked = rangeCheck(ctx, { ...runOf(parsed, choices), reportedK: null, reportedMethod: null, late: false, excludedRows: [] });
  if (!checked.ok) return { ok: false, message: `${file.name}: ${checked.message}`, columns: parsed.columns };
  return parsed;
}
