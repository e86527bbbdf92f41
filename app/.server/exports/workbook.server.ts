// Spreadsheet building blocks for the exports: a table sheet whose numbers are stored as numbers
// (never text), with units in the headers, a frozen header row, set column widths, and no formula
// (so no cell lacks its cached value). Records systems and LibreOffice read these as they are.
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

function columnStyle(c: SheetColumn<never>): Partial<ExcelJS.Style> {
  if (c.numFmt) return { numFmt: c.numFmt };
  if (c.kind === "datetime") return { numFmt: "yyyy-mm-dd hh:mm" };
  if (c.kind === "integer") return { numFmt: "0" };
  return {};
}

/** Adds one table: headers in row 1 (bold, frozen), one row per item below. */
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
      width: Math.max(c.width ?? DEFAULT_WIDTH[c.kind], Math.min(40, headerText(c).length + 2)),
      style: columnStyle(c as SheetColumn<never>),
    })),
    ...(aside.length ? [{ width: 3 }, ...ASIDE_WIDTHS.map((width) => ({ width }))] : []),
  ];
  ws.getRow(1).font = { bold: true };
  for (const row of rows) ws.addRow(columns.map((c) => typedValue(c.kind, c.value(row))));
  if (!rows.length && options.emptyNote) ws.addRow([options.emptyNote]);
  aside.forEach(([label, value], i) => {
    const labelCell = ws.getCell(i + 1, columns.length + 2);
    labelCell.value = label;
    labelCell.font = { bold: true };
    const valueCell = ws.getCell(i + 1, columns.length + 3);
    valueCell.value = value;
    valueCell.font = { bold: false };
    if (value instanceof Date) valueCell.numFmt = "yyyy-mm-dd hh:mm";
  });
  return ws;
}

export function newWorkbook(title: string): ExcelJS.Workbook {
  const wb = new ExcelJS.Workbook();
  wb.creator = "Ratebook";
  wb.title = title;
  wb.created = new Date();
  return wb;
}

export async function workbookBytes(wb: ExcelJS.Workbook): Promise<Uint8Array> {
  return new Uint8Array(await wb.xlsx.writeBuffer());
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
