// Spreadsheet building blocks for the exports: a table sheet whose numbers are stored as numbers
// (never text), with units in the headers, a frozen header row, set column widths, and no formula
// (so no cell lacks its cached value). Records systems and LibreOffice read these as they are.
import { PassThrough } from "node:stream";
import ExcelJS from "exceljs";

import { headerText, typedValue, type CellKind, type CellValue, type SheetColumn } from "~/lib/exports/table";

export { headerText, typedValue, type CellKind, type CellValue, type SheetColumn } from "~/lib/exports/table";

const DEFAULT_WIDTH: Record<CellKind, number> = { text: 18, number: 13, integer: 9, boolean: 10, datetime: 18 };

// Excel's rules: at most 31 characters, none of : \ / ? * [ ], unique within a workbook (ignoring case).
export function sheetName(raw: string, used: Set<string>): string {
  const base = raw.replace(/[:\\/?*[\]]/g, "-").replace(/^'+|'+$/g, "").trim().slice(0, 31) || "Sheet";
  let name = base;
  for (let i = 2; used.has(name.toLowerCase()); i++) {
    const tail = ` (${i})`;
    name = base.slice(0, 31 - tail.length) + tail;
  }
  used.add(name.toLowerCase());
  return name;
}

export interface TableSheetOptions {
  /** the line written under the headers when there are no rows, saying what to do next */
  emptyNote?: string;
  /** the title is a name sheetName() already gave out for this workbook: use it as it is */
  reservedName?: boolean;
  /**
   * Label and value pairs written beside the table (one column gap to its right, from row 1 down),
   * for what describes the whole sheet (e.g. the file the readings came from); the table itself
   * keeps row 1 as its only, frozen header row.
   */
  aside?: Array<[label: string, value: CellValue]>;
}

const ASIDE_WIDTHS = [18, 36];

// Cell styles are shared objects, one per format: exceljs recognises a style object it has seen
// (it keys them by object) instead of working each cell's style out again, which is a good part
// of a large workbook's build (hundreds of sheets). They are frozen because changing one would
// change every cell sharing it: give a cell another style object instead of setting its font.
const PLAIN: Partial<ExcelJS.Style> = Object.freeze({});
const HEADER: Partial<ExcelJS.Style> = Object.freeze({ font: Object.freeze({ bold: true }) });
const FORMATS = new Map<string, Partial<ExcelJS.Style>>();
const DATETIME_FORMAT = "yyyy-mm-dd hh:mm";

function formatStyle(numFmt: string): Partial<ExcelJS.Style> {
  let style = FORMATS.get(numFmt);
  if (!style) FORMATS.set(numFmt, (style = Object.freeze({ numFmt })));
  return style;
}

function cellStyle(c: SheetColumn<never>): Partial<ExcelJS.Style> {
  if (c.numFmt) return formatStyle(c.numFmt);
  if (c.kind === "datetime") return formatStyle(DATETIME_FORMAT);
  if (c.kind === "integer") return formatStyle("0");
  return PLAIN;
}

// exceljs leaves out a column whose width is its default (9) and has no style of its own, so the
// file would say nothing of it: such a column gets a hair more.
const columnWidth = (w: number) => (w === 9 ? 9.5 : w);

/** Adds one complete table sheet: headers in row 1 (bold, frozen), one row per item below. */
export function addTableSheet<Row>(
  wb: ExcelJS.Workbook,
  used: Set<string>,
  title: string,
  columns: SheetColumn<Row>[],
  rows: readonly Row[],
  options: TableSheetOptions = {},
): ExcelJS.Worksheet {
  const name = options.reservedName ? title : sheetName(title, used);
  const ws = wb.addWorksheet(name, { views: [{ state: "frozen", ySplit: 1, xSplit: 0 }] });
  const aside = options.aside ?? [];
  ws.columns = [
    ...columns.map((c) => ({
      header: headerText(c),
      width: columnWidth(Math.max(c.width ?? DEFAULT_WIDTH[c.kind], Math.min(40, headerText(c).length + 2))),
    })),
    ...(aside.length ? [{ width: 3 }, ...ASIDE_WIDTHS.map((width) => ({ width }))] : []),
  ];
  ws.getRow(1).eachCell((cell) => void (cell.style = HEADER));
  const styles = columns.map((c) => cellStyle(c as SheetColumn<never>));
  for (const row of rows) {
    // An empty value makes no cell at all (exceljs skips undefined), which is an empty cell to a reader.
    ws.addRow(columns.map((c) => typedValue(c.kind, c.value(row)) ?? undefined)).eachCell((cell, n) => void (cell.style = styles[n - 1]));
  }
  if (!rows.length && options.emptyNote) ws.addRow([options.emptyNote]).getCell(1).style = PLAIN;
  aside.forEach(([label, value], i) => {
    const labelCell = ws.getCell(i + 1, columns.length + 2);
    labelCell.value = label;
    labelCell.style = HEADER;
    if (value === null) return;
    const valueCell = ws.getCell(i + 1, columns.length + 3);
    valueCell.value = value;
    valueCell.style = value instanceof Date ? formatStyle(DATETIME_FORMAT) : PLAIN;
  });
  ws.commit(); // written out now: a sheet is complete when it is added
  return ws;
}

// Workbooks are written as they are built (exceljs's streaming WorkbookWriter): each sheet is
// turned into XML and compressed (node's zlib) as soon as addTableSheet has filled it, so only one
// sheet's rows are held at a time. For a course of 300 students and 12 practicals (1,154 sheets)
// it took as long as the in-memory workbook (1.5-2 s) but the process peaked at 400 MB instead of
// 640 MB (npm run bench:export; DEVELOPERS.md).
const outputs = new WeakMap<ExcelJS.Workbook, Promise<Uint8Array>>();

export function newWorkbook(title: string): ExcelJS.Workbook {
  const out = new PassThrough();
  const chunks: Buffer[] = [];
  const bytes = new Promise<Uint8Array>((resolve, reject) => {
    out.on("data", (c: Buffer) => chunks.push(c));
    out.on("end", () => resolve(new Uint8Array(Buffer.concat(chunks))));
    out.on("error", reject);
  });
  bytes.catch(() => undefined); // read by workbookBytes; never an unhandled rejection before then
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useStyles: true, useSharedStrings: true, zip: { zlib: { level: 6 } } });
  wb.creator = "Ratebook";
  wb.title = title;
  wb.created = new Date();
  outputs.set(wb, bytes);
  return wb;
}

/** Finishes the workbook (no sheet can be added after) and returns the file's bytes. */
export async function workbookBytes(wb: ExcelJS.Workbook): Promise<Uint8Array> {
  const bytes = outputs.get(wb);
  if (!bytes) throw new Error("workbookBytes takes a workbook made by newWorkbook");
  await (wb as ExcelJS.stream.xlsx.WorkbookWriter).commit();
  return bytes;
}

export const XLSX_TYPE = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";
export const CSV_TYPE = "text/csv; charset=utf-8";

/** `Course code – 2026-12-02.xlsx` made safe for a Content-Disposition header and a file system. */
export function downloadName(parts: string[], date: Date, ext: "xlsx" | "csv"): string {
  const stem = [...parts, date.toISOString().slice(0, 10)]
    .map((p) => p.replace(/[^\p{L}\p{N} ._-]+/gu, " ").replace(/\s+/g, " ").trim())
    .filter(Boolean)
    .join(" - ");
  return `${stem || "ratebook"}.${ext}`;
}

/** Content-Disposition with a plain ASCII fallback and the UTF-8 name (RFC 6266 / RFC 5987). */
export function attachment(fileName: string): string {
  const ascii = fileName.normalize("NFKD").replace(/[^\x20-\x7e]/g, "").replace(/["\\]/g, "");
  return `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(fileName)}`;
}

/** A file download: its bytes with their type and name, never cached (marks change; they are personal data). */
export function downloadResponse(body: Uint8Array | string, fileName: string, contentType: string): Response {
  const bytes = typeof body === "string" ? new TextEncoder().encode(body) : body;
  return new Response(bytes as BodyInit, {
    headers: {
      "Content-Type": contentType,
      "Content-Length": String(bytes.byteLength),
      "Content-Disposition": attachment(fileName),
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
    },
  });
}
