// Bounds on CSV text, checked in one pass over the characters BEFORE papaparse splits it and the
// table is analysed: a 420 kB header of 20,000 columns, or a 4.8 MB line, costs every later stage
// (columns, cells, guesses) time and memory in proportion to its width. The scan follows the same
// quoting as papaparse (a quote opens a field only at its start; "" inside is one quote), so rows
// are counted as the reader counts them: the file's own row numbers.
import { columnLetter } from "./table.ts";

export interface CsvLimits {
  maxRows: number;
  maxColumns: number;
  /** characters of one field (a quoted field may hold line breaks) */
  maxFieldChars: number;
  /** characters between two line breaks */
  maxLineChars: number;
}

/** The same rows and columns as an .xlsx of readings (see xlsx-bounds.server.ts). */
export const READINGS_CSV_LIMITS: CsvLimits = { maxRows: 100_000, maxColumns: 200, maxFieldChars: 2_000, maxLineChars: 32_768 };

/** Rosters: the same rows and columns as a roster workbook. */
export const ROSTER_CSV_LIMITS: CsvLimits = { maxRows: 20_000, maxColumns: 50, maxFieldChars: 2_000, maxLineChars: 32_768 };

export class CsvBoundsError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "CsvBoundsError";
  }
}

const en = (n: number) => n.toLocaleString("en");
const QUOTE = 34;
const CR = 13;
const LF = 10;

/** Throws CsvBoundsError at the first limit passed, naming it, the row and the column; linear in the text. */
export function checkCsvBounds(text: string, delimiter: string, fileName: string, limits: CsvLimits): { rows: number; columns: number } {
  const delim = delimiter.charCodeAt(0);
  const fix = "Check that this is the readings file; save only the sheet with the readings as CSV.";
  let row = 1;
  let col = 1;
  let maxCol = 0;
  let fieldStart = 0;
  let lineStart = 0;
  let quoted = false;
  let atFieldStart = true;
  const n = text.length;
  const endField = (i: number) => {
    if (i - fieldStart > limits.maxFieldChars) {
      throw new CsvBoundsError(`${fileName}, row ${en(row)}, column ${columnLetter(col - 1)}: a field of ${en(i - fieldStart)} characters; at most ${en(limits.maxFieldChars)} characters a field are read. ${fix}`);
    }
  };
  for (let i = 0; i < n; i++) {
    const ch = text.charCodeAt(i);
    if (quoted) {
      if (ch === QUOTE) {
        if (text.charCodeAt(i + 1) === QUOTE) i++;
        else quoted = false;
      } else if (ch === LF || ch === CR) {
        lineStart = i + 1;
      }
      if (i - fieldStart > limits.maxFieldChars) {
        throw new CsvBoundsError(
          `${fileName}, row ${en(row)}, column ${columnLetter(col - 1)}: a quoted field runs past ${en(limits.maxFieldChars)} characters (is its closing quote missing?); at most ${en(limits.maxFieldChars)} characters a field are read. ${fix}`,
        );
      }
      continue;
    }
    if (ch === QUOTE && atFieldStart) {
      quoted = true;
      atFieldStart = false;
      continue;
    }
    atFieldStart = false;
    if (ch === delim) {
      endField(i);
      col++;
      if (col > limits.maxColumns) {
        throw new CsvBoundsError(`${fileName}, row ${en(row)}: more than ${en(limits.maxColumns)} columns (column ${columnLetter(col - 1)} is number ${en(col)}); at most ${en(limits.maxColumns)} columns are read. ${fix}`);
      }
      fieldStart = i + 1;
      atFieldStart = true;
    } else if (ch === LF || ch === CR) {
      endField(i);
      if (i - lineStart > limits.maxLineChars) {
        throw new CsvBoundsError(`${fileName}, row ${en(row)}: a line of ${en(i - lineStart)} characters; at most ${en(limits.maxLineChars)} characters a line are read. ${fix}`);
      }
      if (ch === CR && text.charCodeAt(i + 1) === LF) i++;
      if (col > maxCol) maxCol = col;
      // a line break that ends the text starts no row
      if (i + 1 < n) row++;
      if (row > limits.maxRows) {
        throw new CsvBoundsError(`${fileName} has more than ${en(limits.maxRows)} rows (row ${en(row)} and on); at most ${en(limits.maxRows)} rows are read. ${fix}`);
      }
      col = 1;
      fieldStart = i + 1;
      lineStart = i + 1;
      atFieldStart = true;
      continue;
    }
    if (i + 1 - lineStart > limits.maxLineChars) {
      throw new CsvBoundsError(`${fileName}, row ${en(row)}: a line longer than ${en(limits.maxLineChars)} characters; at most ${en(limits.maxLineChars)} characters a line are read. ${fix}`);
    }
    if (i + 1 - fieldStart > limits.maxFieldChars) endField(i + 1);
  }
  endField(n);
  if (col > maxCol) maxCol = col;
  return { rows: row, columns: maxCol };
}
