// Bounds on an .xlsx workbook, checked BEFORE exceljs builds anything: exceljs makes an object for
// every row and cell up to the highest address it sees (and for every cell of a merged range, of a
// data-validation range, every column of a <col> range), so one cell in the last column, or one row
// numbered 20,000,000, in a few-kB file exhausts the heap. Here the parts exceljs reads are inflated
// with a cap on the bytes that really come out (a zip's declared sizes can lie), each sheet's XML is
// scanned once, in linear time, and only those checked parts go on to exceljs, repacked into a new
// archive: a hidden or extra entry of the original never reaches it.
import JSZip from "jszip";

export interface XlsxLimits {
  maxRows: number;
  maxColumns: number;
  /** cells exceljs would build, over all sheets together */
  maxCells: number;
  /** Uncompressed bytes of one sheet's XML. */
  maxSheetBytes: number;
  /** Uncompressed bytes of all parts read together. */
  maxTotalBytes: number;
  /** merged ranges per sheet (exceljs compares each new one with every earlier one) */
  maxMerges: number;
}

/** Readings: a logger at one reading a second for a day is 86,400 rows; a few columns. */
export const READINGS_XLSX_LIMITS: XlsxLimits = {
  maxRows: 100_000,
  maxColumns: 200,
  maxCells: 1_000_000,
  maxSheetBytes: 48 * 1024 * 1024,
  maxTotalBytes: 64 * 1024 * 1024,
  maxMerges: 1_000,
};

/** Rosters: one row per student. */
export const ROSTER_XLSX_LIMITS: XlsxLimits = {
  maxRows: 20_000,
  maxColumns: 50,
  maxCells: 200_000,
  maxSheetBytes: 16 * 1024 * 1024,
  maxTotalBytes: 24 * 1024 * 1024,
  maxMerges: 1_000,
};

/** The widest sheet a spreadsheet program writes (XFD); <col> ranges up to it are ordinary. */
const SPREADSHEET_COLUMNS = 16_384;

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

const en = (n: number) => n.toLocaleString("en");
const mib = (n: number) => `${(n / 1048576).toFixed(0)} MiB`;

function declaredSize(file: JSZip.JSZipObject): number {
  const data = (file as unknown as { _data?: { uncompressedSize?: number } })._data;
  return typeof data?.uncompressedSize === "number" ? data.uncompressedSize : 0;
}

export interface SheetScan {
  rows: number;
  columns: number;
  cells: number;
  /** cells exceljs builds on a full load: the sum of row widths, merged and validated areas */
  span: number;
  /** every row and cell carries its address (the streaming reader needs them) */
  addressed: boolean;
}

/** "B2:D10" (or "B2") as rows and columns, or null when it is not an address. */
function rangeOf(ref: string): { top: number; left: number; bottom: number; right: number } | null {
  const m = /^\$?([A-Z]{1,3})\$?(\d+)(?::\$?([A-Z]{1,3})\$?(\d+))?$/.exec(ref.trim());
  if (!m) return null;
  const a = { col: columnNumber(m[1]), row: Number(m[2]) };
  const b = m[3] ? { col: columnNumber(m[3]), row: Number(m[4]) } : a;
  return { top: Math.min(a.row, b.row), bottom: Math.max(a.row, b.row), left: Math.min(a.col, b.col), right: Math.max(a.col, b.col) };
}

/**
 * Scan one sheet's XML. Rows without an `r` attribute follow the previous row, as exceljs reads them.
 * Throws as soon as a limit is passed, naming it and where. `spanBefore` counts cells of earlier sheets.
 */
export function checkSheetXml(xml: string, where: string, limits: XlsxLimits, spanBefore = 0): SheetScan {
  const dim = /<dimension\b[^>]*\bref="([A-Z]{1,3})(\d+)(?::([A-Z]{1,3})(\d+))?"/.exec(xml.slice(0, 4096));
  if (dim) {
    const lastCol = columnNumber(dim[3] ?? dim[1]);
    const lastRow = Number(dim[4] ?? dim[2]);
    if (lastRow > limits.maxRows) throw new XlsxBoundsError(`${where} reaches row ${en(lastRow)} (its dimension); at most ${en(limits.maxRows)} rows are read. Copy the readings to a new sheet and save again.`);
    if (lastCol > limits.maxColumns) throw new XlsxBoundsError(`${where} reaches column ${en(lastCol)} (its dimension); at most ${limits.maxColumns} columns are read. Copy the readings to a new sheet and save again.`);
  }
  const cellLimit = (what: string) =>
    new XlsxBoundsError(`${where} ${what}; at most ${en(limits.maxCells)} cells are read${spanBefore ? " from all sheets together" : ""}. Copy the readings to a new sheet and save again.`);
  const tag = /<(row|c|col|mergeCell|dataValidation)\b([^>]*)>/g;
  let row = 0;
  let col = 0;
  let maxCol = 0;
  let cells = 0;
  let merges = 0;
  let addressed = true;
  // exceljs fills every cell of a row up to its last one: the cost is the sum of row widths
  let rowWidth = 0;
  let span = spanBefore;
  let m: RegExpExecArray | null;
  const area = (ref: string, what: string): number => {
    const r = rangeOf(ref);
    if (!r) return 0;
    if (r.bottom > limits.maxRows) throw new XlsxBoundsError(`${where} has a ${what} ${ref} reaching row ${en(r.bottom)}; at most ${en(limits.maxRows)} rows are read.`);
    if (r.right > limits.maxColumns) throw new XlsxBoundsError(`${where} has a ${what} ${ref} reaching column ${en(r.right)}; at most ${limits.maxColumns} columns are read.`);
    return (r.bottom - r.top + 1) * (r.right - r.left + 1);
  };
  while ((m = tag.exec(xml))) {
    const kind = m[1];
    if (kind === "row") {
      const r = /\br="(\d+)"/.exec(m[2]);
      if (!r) addressed = false;
      row = r ? Number(r[1]) : row + 1;
      col = 0;
      span += rowWidth;
      rowWidth = 0;
      if (row > limits.maxRows) throw new XlsxBoundsError(`${where} has a row numbered ${en(row)}; at most ${en(limits.maxRows)} rows are read.`);
    } else if (kind === "c") {
      const r = /\br="([A-Z]{1,3})(\d+)"/.exec(m[2]);
      if (!r) addressed = false;
      col = r ? columnNumber(r[1]) : col + 1;
      if (r && Number(r[2]) > limits.maxRows) throw new XlsxBoundsError(`${where} has a cell in row ${en(Number(r[2]))}; at most ${en(limits.maxRows)} rows are read.`);
      if (col > limits.maxColumns) throw new XlsxBoundsError(`${where} has a cell in column ${en(col)}${r ? ` (${r[1]}${r[2]})` : ` (row ${en(row)})`}; at most ${limits.maxColumns} columns are read.`);
      if (col > maxCol) maxCol = col;
      if (col > rowWidth) rowWidth = col;
      cells++;
      if (span + rowWidth > limits.maxCells) throw cellLimit(`spans more than ${en(limits.maxCells)} cells by row ${en(row)} (columns up to ${maxCol})`);
    } else if (kind === "col") {
      const max = /\bmax="(\d+)"/.exec(m[2]);
      if (max && Number(max[1]) > SPREADSHEET_COLUMNS) throw new XlsxBoundsError(`${where} defines columns up to number ${en(Number(max[1]))}; a sheet has at most ${en(SPREADSHEET_COLUMNS)}.`);
    } else if (kind === "mergeCell") {
      const ref = /\bref="([^"]*)"/.exec(m[2]);
      if (++merges > limits.maxMerges) throw new XlsxBoundsError(`${where} has more than ${en(limits.maxMerges)} merged ranges; at most ${en(limits.maxMerges)} are read. Unmerge the cells and save again.`);
      if (ref) span += area(ref[1], "merged range");
      if (span > limits.maxCells) throw cellLimit(`has merged ranges covering more than ${en(limits.maxCells)} cells`);
    } else {
      const sqref = /\bsqref="([^"]*)"/.exec(m[2]);
      if (sqref) for (const ref of sqref[1].split(/\s+/)) if (ref) span += area(ref, "data-validation range");
      if (span > limits.maxCells) throw cellLimit(`has data-validation ranges covering more than ${en(limits.maxCells)} cells`);
    }
  }
  span += rowWidth;
  if (span > limits.maxCells) throw cellLimit(`spans ${en(span - spanBefore)} cells`);
  return { rows: row, columns: maxCol, cells, span: span - spanBefore, addressed };
}

interface InternalStream {
  on(event: "data", f: (chunk: Uint8Array) => void): InternalStream;
  on(event: "error", f: (error: Error) => void): InternalStream;
  on(event: "end", f: () => void): InternalStream;
  pause(): InternalStream;
  resume(): InternalStream;
}

/** Inflates one part, stopping as soon as more than `cap` bytes have come out. */
function inflateCapped(file: JSZip.JSZipObject, cap: number, tooBig: () => XlsxBoundsError): Promise<Uint8Array> {
  return new Promise((resolve, reject) => {
    const chunks: Uint8Array[] = [];
    let size = 0;
    let done = false;
    // JSZip's own stream (not in its typings): inflates a block at a time and can be paused
    const stream = (file as unknown as { internalStream(type: "uint8array"): InternalStream }).internalStream("uint8array");
    stream
      .on("data", (chunk: Uint8Array) => {
        if (done) return;
        size += chunk.length;
        if (size > cap) {
          done = true;
          stream.pause();
          reject(tooBig());
          return;
        }
        chunks.push(chunk);
      })
      .on("error", (error: Error) => {
        if (done) return;
        done = true;
        reject(error);
      })
      .on("end", () => {
        if (done) return;
        done = true;
        const out = new Uint8Array(size);
        let at = 0;
        for (const c of chunks) {
          out.set(c, at);
          at += c.length;
        }
        resolve(out);
      })
      .resume();
  });
}

export interface CheckedSheet {
  /** the sheet's name on its tab */
  name: string;
  /** path in the checked archive, xl/worksheets/sheetN.xml */
  path: string;
  scan: SheetScan;
}

export interface CheckedWorkbook {
  /** sheets in tab order */
  sheets: CheckedSheet[];
  /** cells exceljs would build for all sheets on a full load */
  span: number;
  /** a new archive holding only the checked parts, stored uncompressed */
  archive: Uint8Array;
}

/** Parts besides the sheets that exceljs reads for values, shared text, dates and sheet names. */
const SUPPORT_PARTS = ["[Content_Types].xml", "_rels/.rels", "xl/workbook.xml", "xl/_rels/workbook.xml.rels", "xl/styles.xml", "xl/sharedStrings.xml"];

const decoder = new TextDecoder("utf-8");
const EMPTY_SHARED_STRINGS = '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="0" uniqueCount="0"/>';

/** Sheet names and paths in tab order, from workbook.xml and its relationships. */
function sheetOrder(workbookXml: string, relsXml: string, present: Set<string>): Array<{ name: string; path: string }> {
  const targets = new Map<string, string>();
  for (const rel of relsXml.matchAll(/<Relationship\b([^>]*)>/g)) {
    const id = /\bId="([^"]*)"/.exec(rel[1]);
    const target = /\bTarget="([^"]*)"/.exec(rel[1]);
    if (id && target) targets.set(id[1], target[1].replace(/^\/?xl\//, "").replace(/^\//, ""));
  }
  const out: Array<{ name: string; path: string }> = [];
  for (const sheet of workbookXml.matchAll(/<sheet\b([^>]*)>/g)) {
    const name = /\bname="([^"]*)"/.exec(sheet[1]);
    const rid = /\br:id="([^"]*)"/.exec(sheet[1]) ?? /\bid="([^"]*)"/.exec(sheet[1]);
    const target = rid ? targets.get(rid[1]) : undefined;
    const path = target ? `xl/${target}` : "";
    if (name && present.has(path)) out.push({ name: name[1].replace(/&amp;/g, "&").replace(/&lt;/g, "<").replace(/&gt;/g, ">").replace(/&quot;/g, '"').replace(/&apos;/g, "'"), path });
  }
  return out;
}

/**
 * Opens a workbook within limits: the sizes the zip declares, the bytes its parts really inflate
 * to, and each sheet's rows, columns and cells. Refuses (XlsxBoundsError) naming the limit and where.
 */
export async function checkXlsxBounds(bytes: Uint8Array, fileName: string, limits: XlsxLimits): Promise<CheckedWorkbook> {
  let zip: JSZip;
  try {
    zip = await JSZip.loadAsync(bytes);
  } catch (error) {
    throw new XlsxBoundsError(`${fileName} could not be opened as an .xlsx workbook (${(error as Error).message}). Save it again from your spreadsheet as .xlsx or CSV.`);
  }
  let declared = 0;
  const sheetPaths: string[] = [];
  zip.forEach((path, file) => {
    if (file.dir) return;
    if (/^xl\/worksheets\/sheet\d+\.xml$/.test(path)) {
      sheetPaths.push(path);
      declared += declaredSize(file);
    } else if (SUPPORT_PARTS.includes(path)) declared += declaredSize(file);
  });
  if (declared > limits.maxTotalBytes) throw new XlsxBoundsError(`${fileName} unpacks to ${mib(declared)}; at most ${mib(limits.maxTotalBytes)} are read.`);
  let total = 0;
  const parts = new Map<string, Uint8Array>();
  const read = async (path: string, cap: number, tooBig: () => XlsxBoundsError) => {
    const file = zip.file(path);
    if (!file) return null;
    const remaining = limits.maxTotalBytes - total;
    const byTotal = remaining < cap;
    let out: Uint8Array;
    try {
      out = await inflateCapped(file, byTotal ? remaining : cap, () => (byTotal ? new XlsxBoundsError(`${fileName} unpacks to more than ${mib(limits.maxTotalBytes)}; at most ${mib(limits.maxTotalBytes)} are read.`) : tooBig()));
    } catch (error) {
      if (error instanceof XlsxBoundsError) throw error;
      throw new XlsxBoundsError(`${fileName} could not be opened as an .xlsx workbook (${path}: ${(error as Error).message}). Save it again from your spreadsheet as .xlsx or CSV.`);
    }
    total += out.length;
    parts.set(path, out);
    return out;
  };
  for (const path of SUPPORT_PARTS) await read(path, limits.maxTotalBytes, () => new XlsxBoundsError(`${fileName}: ${path} unpacks to more than ${mib(limits.maxTotalBytes)}.`));
  const workbookXml = parts.get("xl/workbook.xml");
  const relsXml = parts.get("xl/_rels/workbook.xml.rels");
  if (!workbookXml || !relsXml) throw new XlsxBoundsError(`${fileName} is a zip archive but not an .xlsx workbook (it has no xl/workbook.xml). Save it again from your spreadsheet as .xlsx or CSV.`);
  const order = sheetOrder(decoder.decode(workbookXml), decoder.decode(relsXml), new Set(sheetPaths));
  const sheets: CheckedSheet[] = [];
  let span = 0;
  for (const { name, path } of order) {
    const where = `${fileName}, sheet "${name}"`;
    const xmlBytes = await read(path, limits.maxSheetBytes, () => new XlsxBoundsError(`${where} unpacks to more than ${mib(limits.maxSheetBytes)}; at most ${mib(limits.maxSheetBytes)} per sheet are read.`));
    if (!xmlBytes) continue;
    const scan = checkSheetXml(decoder.decode(xmlBytes), where, limits, span);
    span += scan.span;
    sheets.push({ name, path, scan });
  }
  // Only the checked parts, in the order a streaming reader wants them (shared text before sheets).
  const clean = new JSZip();
  for (const path of SUPPORT_PARTS) if (parts.has(path)) clean.file(path, parts.get(path)!);
  // without shared text the streaming reader would park every sheet in a temporary file
  if (!parts.has("xl/sharedStrings.xml")) clean.file("xl/sharedStrings.xml", EMPTY_SHARED_STRINGS);
  for (const s of sheets) clean.file(s.path, parts.get(s.path)!);
  parts.clear();
  const archive = await clean.generateAsync({ type: "uint8array", compression: "STORE" });
  return { sheets, span, archive };
}
