// Spreadsheet building blocks for the exports: a table sheet whose numbers are stored as numbers
// (never text), with units in the headers, a frozen header row, set column widths, and no formula
// (so no cell lacks its cached value). Records systems and LibreOffice read these as they are.
import ExcelJS from "exceljs";

import { headerText, typedValue, type CellKind, type SheetColumn } from "~/lib/exports/table";

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
  const ws = wb.addWorksheet(sheetName(title, used), { views: [{ state: "frozen", ySplit: 1, xSplit: 0 }] });
  ws.columns = columns.map((c) => ({
    header: headerText(c),
    width: Math.max(c.width ?? DEFAULT_WIDTH[c.kind], Math.min(40, headerText(c).length + 2)),
    style: c.numFmt ? { numFmt: c.numFmt } : c.kind === "datetime" ? { numFmt: "yyyy-mm-dd hh:mm" } : c.kind === "integer" ? { numFmt: "0" } : {},
  }));
  ws.getRow(1).font = { bold: true };
  for (const row of rows) ws.addRow(columns.map((c) => typedValue(c.kind, c.value(row))));
  if (!rows.length && options.emptyNote) ws.addRow([options.emptyNote]);
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
