// A readings file as a table of cells, whatever it came from (CSV text or a spreadsheet), and
// what we can say about its columns: header text, the unit written in it, whether it holds numbers.
// Pure, so the server, the tests and the browser share it.

import { isUnitCell, unitCellText } from "./unit-words.ts";

/** One cell as read: a number already (spreadsheets), text (CSV, spreadsheet text) or nothing. */
export type Cell = number | string | null;

export interface RawRow {
  /** 1-based row number in the file (line of a CSV, row of the sheet), for messages */
  rowNumber: number;
  cells: Cell[];
}

export interface RawTable {
  source: "csv" | "xlsx";
  rows: RawRow[];
  /** how the file was read (delimiter, decimal mark, sheet), in words for the person who sent it */
  notes: string[];
  /** csv: the decimal mark used in the text; numbers in "1,5" form are read with it */
  decimalComma: boolean;
  /** columns whose values were times of day or dates and were turned into seconds elapsed */
  elapsedColumns?: number[];
  sheetName?: string;
}

export interface ColumnInfo {
  /** 0-based */
  index: number;
  /** spreadsheet-style letter: A, B, ..., AA */
  letter: string;
  /** header text as written, or "" without a header row */
  header: string;
  /** the quantity's name without its unit, e.g. "t" from "t / min" */
  name: string;
  /** the unit written in the header, e.g. "min" from "t / min" or "mS/cm" from "kappa (mS/cm)" */
  unit: string;
  /** share of data rows in which this column holds a number */
  numericShare: number;
}

export interface TableShape {
  /** index into rows of the header row, or -1 without one */
  headerRow: number;
  /** index into rows of a row of units under the header (`min,mmol/L`), or -1 without one */
  unitsRow: number;
  /** index into rows of the first data row */
  firstDataRow: number;
  columns: ColumnInfo[];
}

export function columnLetter(index: number): string {
  let s = "";
  let n = index + 1;
  while (n > 0) {
    const r = (n - 1) % 26;
    s = String.fromCharCode(65 + r) + s;
    n = Math.floor((n - 1) / 26);
  }
  return s;
}

const NUMBER_POINT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NUMBER_COMMA = /^[+-]?(\d+,?\d*|,\d+)([eE][+-]?\d+)?$/;

/**
 * A cell as a number, or null. Text may use a decimal comma when the file does (a comma can
 * then never be a thousands separator, as in the locales that write it; common practice, no source).
 * A true minus sign (U+2212) and surrounding spaces are accepted.
 */
export function cellNumber(cell: Cell, decimalComma: boolean): number | null {
  if (cell === null) return null;
  if (typeof cell === "number") return Number.isFinite(cell) ? cell : null;
  const s = cell.trim().replace(/\u2212/g, "-").replace(/\s+/g, "");
  if (s === "") return null;
  if (NUMBER_POINT.test(s)) return Number(s);
  if (decimalComma && NUMBER_COMMA.test(s)) return Number(s.replace(",", "."));
  return null;
}

export function isBlankRow(row: RawRow): boolean {
  return row.cells.every((c) => c === null || (typeof c === "string" && c.trim() === ""));
}

/** Splits a header such as "t / min", "kappa (mS/cm)", "c [mmol/L]" or "time, s" into name and unit. */
export function splitHeader(header: string): { name: string; unit: string } {
  const h = header.trim();
  let m = /^(.*?)\s*[([]\s*([^)\]]*?)\s*[)\]]\s*$/.exec(h);
  if (m && m[1]) return { name: m[1].trim(), unit: m[2].trim() };
  m = /^(.*?)\s+\/\s+(.+)$/.exec(h);
  if (m) return { name: m[1].trim(), unit: m[2].trim() };
  m = /^(.*?)\s*,\s*(\S+)$/.exec(h);
  if (m && m[1]) return { name: m[1].trim(), unit: m[2].trim() };
  m = /^(.*?)\/(.+)$/.exec(h); // "t/min" without spaces (but not a bare unit such as "mS/cm")
  if (m && m[1] && /^[A-Za-z_ ]+$/.test(m[1]) && TIME_WORDS.has(m[2].trim().toLowerCase())) return { name: m[1].trim(), unit: m[2].trim() };
  return { name: h, unit: "" };
}

const TIME_WORDS = new Set(["s", "sec", "secs", "second", "seconds", "min", "mins", "minute", "minutes", "h", "hr", "hrs", "hour", "hours"]);

/**
 * Where the header is and what each column holds. The header is the last row before the first
 * row with at least two numbers (title lines above it are skipped); no such text row: no header.
 */
export function describeTable(table: RawTable): TableShape | null {
  const rows = table.rows;
  const countNumbers = (r: RawRow) => r.cells.reduce<number>((n, c) => n + (cellNumber(c, table.decimalComma) === null ? 0 : 1), 0);
  let firstDataRow = -1;
  for (let i = 0; i < rows.length; i++) {
    if (countNumbers(rows[i]) >= 2) {
      firstDataRow = i;
      break;
    }
  }
  if (firstDataRow < 0) return null;
  const lastTextRowBefore = (end: number) => {
    for (let i = end - 1; i >= 0; i--) if (!isBlankRow(rows[i])) return i;
    return -1;
  };
  let headerRow = lastTextRowBefore(firstDataRow);
  // Spreadsheets and loggers often write the units in a row of their own under the names.
  let unitsRow = -1;
  if (headerRow >= 0 && isUnitsRow(rows[headerRow])) {
    unitsRow = headerRow;
    headerRow = lastTextRowBefore(unitsRow);
  }
  const width = rows.slice(Math.max(0, headerRow), rows.length).reduce((w, r) => Math.max(w, r.cells.length), 0);
  const dataRows = rows.slice(firstDataRow).filter((r) => !isBlankRow(r));
  const columns: ColumnInfo[] = [];
  for (let c = 0; c < width; c++) {
    const headerCell = headerRow >= 0 ? rows[headerRow].cells[c] : null;
    const header = headerCell === null || headerCell === undefined ? "" : String(headerCell).trim();
    const split = splitHeader(header);
    const unitCell = unitsRow >= 0 ? rows[unitsRow].cells[c] : null;
    const rowUnit = typeof unitCell === "string" ? unitCellText(unitCell) : "";
    // under a units row, "c(A)" is a name (the species), not a name and a unit
    const name = rowUnit && split.unit && !isUnitCell(split.unit) ? header : split.name;
    const unit = rowUnit || split.unit;
    let numeric = 0;
    for (const r of dataRows) if (cellNumber(r.cells[c] ?? null, table.decimalComma) !== null) numeric++;
    columns.push({
      index: c,
      letter: columnLetter(c),
      header,
      name,
      unit: table.elapsedColumns?.includes(c) ? "s" : unit,
      numericShare: dataRows.length ? numeric / dataRows.length : 0,
    });
  }
  return { headerRow, unitsRow, firstDataRow, columns };
}

/** A row whose filled cells are all units ("min", "(mmol/L)", "mS/cm"): at least one, no numbers. */
export function isUnitsRow(row: RawRow): boolean {
  const filled = row.cells.filter((c) => c !== null && !(typeof c === "string" && c.trim() === ""));
  return filled.length > 0 && filled.every((c) => typeof c === "string" && isUnitCell(c));
}

/** Columns that hold numbers in at least half the data rows: the ones a reading could come from. */
export function numericColumns(shape: TableShape): ColumnInfo[] {
  return shape.columns.filter((c) => c.numericShare >= 0.5);
}

/** "column B (kappa)" or "column B" */
export function columnText(col: Pick<ColumnInfo, "letter" | "header">): string {
  return col.header ? `column ${col.letter} (${col.header})` : `column ${col.letter}`;
}
