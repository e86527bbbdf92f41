// A decimal comma in text whose columns are also separated by commas ("0,5,1,23" for t = 0.5,
// c = 1.23) cannot be read back: the commas split each number in two. Both readers (an uploaded
// CSV file and rows pasted into the data-set check) use this one test and this one message.

export interface SplitRow {
  /** the file's row (or the pasted line) number, 1-based */
  line: number;
  cells: string[];
}

const DIGITS = /^[+-]?\d+$/;

/**
 * The first row that shows numbers split at their decimal comma, or null. Only rows made of whole
 * numbers count (a decimal comma writer writes no points); they must be wider than the header, or,
 * without a header, vary in width beyond three cells ("0,5,1,23" beside "1,0,82").
 */
export function splitDecimalRow(header: string[] | null, rows: SplitRow[]): SplitRow | null {
  const trimmed = rows.map((r) => ({ line: r.line, cells: dropTrailingEmpty(r.cells) })).filter((r) => r.cells.length > 0);
  if (trimmed.length === 0) return null;
  if (!trimmed.every((r) => r.cells.every((c) => DIGITS.test(c.trim())))) return null;
  const widths = trimmed.map((r) => r.cells.length);
  const headerWidth = header ? dropTrailingEmpty(header).length : 0;
  const split = headerWidth >= 2 ? Math.min(...widths) > headerWidth : new Set(widths).size > 1 && Math.max(...widths) > 3;
  if (!split) return null;
  return trimmed.find((r) => r.cells.length > (headerWidth || 2)) ?? trimmed[0];
}

function dropTrailingEmpty(cells: string[]): string[] {
  let n = cells.length;
  while (n > 0 && cells[n - 1].trim() === "") n--;
  return cells.slice(0, n);
}

/** What is wrong and how to fix it; `where` is "line" for pasted rows, "row" for a file. */
export function splitDecimalMessage(sample: SplitRow, where: "line" | "row"): string {
  return (
    `The numbers seem to use a decimal comma while commas also separate the columns (${where} ${sample.line}: "${sample.cells.join(",")}"), so time and value cannot be told apart. ` +
    "Separate the columns with semicolons or tabs (save from the spreadsheet as CSV with semicolons; pasting from a spreadsheet gives tabs), or use a decimal point."
  );
}
