// Bounds on an .xlsx workbook, checked BEFORE exceljs builds anything: exceljs makes an object for
// every row and cell up to the highest address it sees, so one cell in the last column, or one row
// numbered 20,000,000, in a few-kB file exhausts the heap. Here the sheet XML is scanned once, in
// linear time, for its <dimension>, row numbers and cell addresses, and the zip's declared sizes are
// checked so that a small archive cannot inflate into gigabytes.
import JSZip from "jszip";

export interface XlsxLimits {
  maxRows: number;
  maxColumns: number;
  maxCells: number;
  /** Uncompressed bytes of one sheet's XML. */
  maxSheetBytes: number;
  /** Uncompressed bytes of the whole archive. */
  maxTotalBytes: number;
}

/** Readings: a logger at one reading a second for a day is 86,400 rows; a few columns. */
export const READINGS_XLSX_LIMITS: XlsxLimits = {
  maxRows: 100_000,
  maxColumns: 200,
  maxCells: 1_000_000,
  maxSheetBytes: 64 * 1024 * 1024,
  maxTotalBytes: 96 * 1024 * 1024,
};

/** Rosters: one row per student. */
export const ROSTER_XLSX_LIMITS: XlsxLimits = {
  maxRows: 20_000,
  maxColumns: 50,
  maxCells: 200_000,
  maxSheetBytes: 32 * 1024 * 1024,
  maxTotalBytes: 48 * 1024 * 1024,
};

export class XlsxBoundsError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "XlsxBoundsError";
  }
}

/** "XFD" -> 16384. */
export function columnNumber(letters: string): number {
  let n = 0;
  for (let i = 0; i < letters.length; i++) n = n * 26 + (letters.charCodeAt(i) - 64);
  return n;
}

function declaredSize(file: JSZip.JSZipObject): number {
  const data = (file as unknown as { _data?: { uncompressedSize?: number } })._data;
  return typeof data?.uncompressedSize === "number" ? data.uncompressedSize : 0;
}

/**
 * Scan one sheet's XML. Rows without an `r` attribute follow the previous row, as exceljs reads them.
 * Throws as soon as a limit is passed, naming it.
 */
export function checkSheetXml(xml: string, where: string, limits: XlsxLimits): { rows: number; columns: number; cells: number } {
  const dim = /<dimension\b[^>]*\bref="([A-Z]{1,3})(\d+)(?::([A-Z]{1,3})(\d+))?"/.exec(xml.slice(0, 4096));
  if (dim) {
    const lastCol = columnNumber(dim[3] ?? dim[1]);
    const lastRow = Number(dim[4] ?? dim[2]);
    if (lastRow > limits.maxRows) throw new XlsxBoundsError(`${where} reaches row ${lastRow.toLocaleString("en")} (its dimension); at most ${limits.maxRows.toLocaleString("en")} rows are read. Copy the readings to a new sheet and save again.`);
    if (lastCol > limits.maxColumns) throw new XlsxBoundsError(`${where} reaches column ${lastCol.toLocaleString("en")} (its dimension); at most ${limits.maxColumns} columns are read. Copy the readings to a new sheet and save again.`);
  }
  const tag = /<(row|c)\b([^>]*)>|<\/row>/g;
  let row = 0;
  let col = 0;
  let maxCol = 0;
  let cells = 0;
  // exceljs fills every cell of a row up to its last one: the cost is the sum of row widths
  let rowWidth = 0;
  let span = 0;
  let m: RegExpExecArray | null;
  while ((m = tag.exec(xml))) {
    if (m[1] === "row") {
      const r = /\br="(\d+)"/.exec(m[2]);
      row = r ? Number(r[1]) : row + 1;
      col = 0;
      span += rowWidth;
      rowWidth = 0;
      if (row > limits.maxRows) throw new XlsxBoundsError(`${where} has a row numbered ${row.toLocaleString("en")}; at most ${limits.maxRows.toLocaleString("en")} rows are read.`);
    } else if (m[1] === "c") {
      const r = /\br="([A-Z]{1,3})(\d+)"/.exec(m[2]);
      col = r ? columnNumber(r[1]) : col + 1;
      if (r && Number(r[2]) > limits.maxRows) throw new XlsxBoundsError(`${where} has a cell in row ${Number(r[2]).toLocaleString("en")}; at most ${limits.maxRows.toLocaleString("en")} rows are read.`);
      if (col > limits.maxColumns) throw new XlsxBoundsError(`${where} has a cell in column ${col.toLocaleString("en")}${r ? ` (${r[1]}${r[2]})` : ""}; at most ${limits.maxColumns} columns are read.`);
      if (col > maxCol) maxCol = col;
      if (col > rowWidth) rowWidth = col;
      cells++;
      if (span + rowWidth > limits.maxCells) throw new XlsxBoundsError(`${where} spans more than ${limits.maxCells.toLocaleString("en")} cells (rows up to ${row.toLocaleString("en")}, columns up to ${maxCol}); at most ${limits.maxCells.toLocaleString("en")} cells are read.`);
    }
  }
  if (span + rowWidth > limits.maxCells) throw new XlsxBoundsError(`${where} spans ${(span + rowWidth).toLocaleString("en")} cells; at most ${limits.maxCells.toLocaleString("en")} cells are read.`);
  return { rows: row, columns: maxCol, cells };
}

/** Refuses a workbook that would be too large to build, before exceljs sees it. */
export async function checkXlsxBounds(bytes: Uint8Array, fileName: string, limits: XlsxLimits): Promise<void> {
  let zip: JSZip;
  try {
    zip = await JSZip.loadAsync(bytes);
  } catch (error) {
    throw new XlsxBoundsError(`${fileName} could not be opened as an .xlsx workbook (${(error as Error).message}). Save it again from your spreadsheet as .xlsx or CSV.`);
  }
  let total = 0;
  const sheets: JSZip.JSZipObject[] = [];
  zip.forEach((path, file) => {
    if (file.dir) return;
    total += declaredSize(file);
    if (/^xl\/worksheets\/[^/]+\.xml$/i.test(path)) sheets.push(file);
  });
  if (total > limits.maxTotalBytes) throw new XlsxBoundsError(`${fileName} unpacks to ${(total / 1048576).toFixed(0)} MiB; at most ${(limits.maxTotalBytes / 1048576).toFixed(0)} MiB are read.`);
  for (const file of sheets) {
    const name = file.name.replace(/^.*\//, "").replace(/\.xml$/i, "");
    const where = `${fileName}, sheet file ${name},`;
    const size = declaredSize(file);
    if (size > limits.maxSheetBytes) throw new XlsxBoundsError(`${where} unpacks to ${(size / 1048576).toFixed(0)} MiB; at most ${(limits.maxSheetBytes / 1048576).toFixed(0)} MiB per sheet are read.`);
    const xml = await file.async("string");
    checkSheetXml(xml, where.replace(/,$/, ""), limits);
  }
}
