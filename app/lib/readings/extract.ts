// From a table of cells to the [time, value] pairs of one run: which two columns (guessed from the
// header, or as the group chose), which units, and a problem with row and column for every row
// that cannot be used. Refuses when fewer than MIN_USABLE_ROWS rows remain.
import type { ConcentrationUnit, TimeUnit } from "../kinetics/units.ts";
import { concentrationUnitFrom, timeUnitFrom } from "./unit-words.ts";
import { Refusal } from "./csv.ts";
import { cellNumber, columnText, describeTable, isBlankRow, numericColumns, type ColumnInfo, type RawTable, type TableShape } from "./table.ts";

export { concentrationUnitFrom, timeUnitFrom };

export const MIN_USABLE_ROWS = 4;

export interface ReadingProblem {
  /** 1-based row in the file */
  row: number;
  /** spreadsheet letter and header, e.g. "B (kappa)"; "" when the whole row is concerned */
  column: string;
  message: string;
}

/** A column chosen by header text or 1-based number (as the API accepts) or letter. */
export type ColumnChoice = string | number | undefined;

export interface ColumnGuess {
  time: ColumnInfo;
  value: ColumnInfo;
  timeUnit: TimeUnit | null;
  /** the concentration unit written in the value header, if it is one */
  concentrationUnit: ConcentrationUnit | null;
}

export interface Extracted {
  shape: TableShape;
  time: ColumnInfo;
  value: ColumnInfo;
  points: [number, number][];
  /** file row of each point */
  rowNumbers: number[];
  problems: ReadingProblem[];
  notes: string[];
  /** a row whose time says it is the final (infinity) reading: ∞, inf, final, end */
  final?: FinalReading;
}

export interface FinalReading {
  /** file row */
  row: number;
  value: number;
  /** the time cell as written */
  label: string;
}

/** A time cell that marks the final reading, taken when the reaction is over (common practice, no source). */
export const FINAL_TIME = /^(∞|inf|infinity|t ?∞|t_?inf|final|end|overnight|next (day|morning))$/i;

const TIME_NAMES = /^(t|time|elapsed( time)?|zeit|tiempo|temps|tid|czas|clock)$/i;

function findColumn(columns: ColumnInfo[], choice: ColumnChoice, what: string): ColumnInfo {
  if (typeof choice === "number" || (typeof choice === "string" && /^\d+$/.test(choice.trim()))) {
    const n = Number(choice);
    const col = columns[n - 1];
    if (!col) throw new Refusal(`The ${what} column number ${n} does not exist: the file has ${columns.length} column(s).`);
    return col;
  }
  const text = String(choice).trim();
  const byHeader = columns.find((c) => c.header === text) ?? columns.find((c) => c.header.toLowerCase() === text.toLowerCase());
  if (byHeader) return byHeader;
  const byLetter = /^[A-Za-z]{1,2}$/.test(text) ? columns.find((c) => c.letter === text.toUpperCase()) : undefined;
  if (byLetter) return byLetter;
  const names = columns.map((c) => (c.header ? `"${c.header}"` : c.letter)).join(", ");
  throw new Refusal(`No ${what} column "${text}" in the file; its columns are ${names}.`);
}

/**
 * The time and value columns most likely meant: time is the column named like a time or with a
 * time unit, else the first numeric column; the value is the next numeric column, preferring one
 * whose name or unit fits what the session measures (hint words such as "kappa", "conductivity").
 */
export function guessColumns(shape: TableShape, valueHints: readonly string[] = []): ColumnGuess | null {
  const numeric = numericColumns(shape);
  if (numeric.length < 2) return null;
  const time =
    numeric.find((c) => TIME_NAMES.test(c.name)) ??
    numeric.find((c) => timeUnitFrom(c.unit) !== null) ??
    numeric[0];
  const others = numeric.filter((c) => c !== time);
  const hinted = others.find((c) => valueHints.some((h) => c.header.toLowerCase().includes(h.toLowerCase())));
  const withConc = others.find((c) => concentrationUnitFrom(c.unit) !== null);
  const value = hinted ?? withConc ?? others[0];
  return { time, value, timeUnit: timeUnitFrom(time.unit), concentrationUnit: concentrationUnitFrom(value.unit) };
}

export function shapeOf(table: RawTable, fileName = "the file"): TableShape {
  const shape = describeTable(table);
  if (!shape || numericColumns(shape).length < 2) {
    throw new Refusal(`${fileName} has no pair of numeric columns (a time and a reading side by side in at least half the rows). Check that the readings are in two columns of numbers.`);
  }
  return shape;
}

/** The pairs of the chosen (or guessed) columns; every row that cannot be used is named. */
export function extractPoints(
  table: RawTable,
  choice: { time?: ColumnChoice; value?: ColumnChoice; valueHints?: readonly string[] } = {},
  fileName = "the file",
): Extracted {
  const shape = shapeOf(table, fileName);
  const guess = guessColumns(shape, choice.valueHints)!;
  const time = choice.time === undefined || choice.time === "" ? guess.time : findColumn(shape.columns, choice.time, "time");
  const value = choice.value === undefined || choice.value === "" ? (guess.value === time ? guess.time : guess.value) : findColumn(shape.columns, choice.value, "value");
  if (time.index === value.index) throw new Refusal(`The time and value columns are both ${columnText(time)}; choose two different columns.`);
  const points: [number, number][] = [];
  const rowNumbers: number[] = [];
  const problems: ReadingProblem[] = [];
  let final: FinalReading | undefined;
  const name = (c: ColumnInfo) => (c.header ? `${c.letter} (${c.header})` : c.letter);
  for (let i = shape.firstDataRow; i < table.rows.length; i++) {
    const row = table.rows[i];
    if (isBlankRow(row)) continue;
    const tCell = row.cells[time.index] ?? null;
    const vCell = row.cells[value.index] ?? null;
    const t = cellNumber(tCell, table.decimalComma);
    const v = cellNumber(vCell, table.decimalComma);
    const label = typeof tCell === "string" ? tCell.trim() : "";
    if (t === null && v !== null && !final && FINAL_TIME.test(label)) {
      final = { row: row.rowNumber, value: v, label };
      continue;
    }
    if (t === null) problems.push({ row: row.rowNumber, column: name(time), message: describeBad(tCell, "time", table.decimalComma) });
    if (v === null) problems.push({ row: row.rowNumber, column: name(value), message: describeBad(vCell, "value", table.decimalComma) });
    if (t !== null && v !== null) {
      points.push([t, v]);
      rowNumbers.push(row.rowNumber);
    }
  }
  if (points.length < MIN_USABLE_ROWS) {
    const why = problems.length ? ` ${problems.length} row(s) could not be read; the first: row ${problems[0].row}, column ${problems[0].column}: ${problems[0].message}` : "";
    throw new Refusal(
      `${fileName} has only ${points.length} usable row(s) of ${columnText(time)} and ${columnText(value)}; at least ${MIN_USABLE_ROWS} are needed to fit a rate constant.${why}`,
    );
  }
  const notes = [...table.notes];
  if (shape.unitsRow >= 0) {
    const units = [time, value].map((c) => `${c.letter}${c.header ? ` (${c.header})` : ""}: ${c.unit || "none"}`).join(", ");
    notes.push(`Row ${table.rows[shape.unitsRow].rowNumber} holds the units, not readings; they were applied (${units}).`);
  }
  return { shape, time, value, points, rowNumbers, problems, notes, ...(final ? { final } : {}) };
}

function describeBad(cell: unknown, what: string, decimalComma: boolean): string {
  if (cell === null || cell === undefined) return `the ${what} is missing`;
  const text = String(cell).trim();
  const hint = !decimalComma && /^[+-]?\d+,\d+$/.test(text) ? " (a decimal comma in a comma-separated file: save with semicolons, or use a point)" : "";
  return `"${text.slice(0, 30)}" is not a number${hint}`;
}
