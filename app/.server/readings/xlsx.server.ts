// An .xlsx workbook into a table of cells, through exceljs: the first sheet that holds a pair of
// numeric columns, formulas read by the value the spreadsheet cached when it was saved, and dates
// or times of day turned into seconds elapsed since the first reading of that column.
import ExcelJS from "exceljs";
import { Refusal } from "~/lib/readings/csv";
import { checkXlsxBounds, READINGS_XLSX_LIMITS, XlsxBoundsError } from "./xlsx-bounds.server";
import { cellNumber, describeTable, numericColumns, type Cell, type RawTable } from "~/lib/readings/table";

type Value = ExcelJS.CellValue;

/** A cell's value with formulas replaced by their cached result; errors become text such as "#DIV/0!". */
function plain(v: Value): number | string | Date | null {
  if (v === null || v === undefined) return null;
  if (typeof v === "number" || typeof v === "string") return v;
  if (typeof v === "boolean") return String(v);
  if (v instanceof Date) return v;
  if ("error" in v) return v.error;
  if ("richText" in v) return v.richText.map((r) => r.text).join("");
  if ("formula" in v || "sharedFormula" in v) {
    const r = (v as ExcelJS.CellFormulaValue).result;
    if (r === undefined) return null;
    return plain(r as Value);
  }
  if ("text" in v) return String(v.text);
  return null;
}

export async function readXlsx(bytes: Uint8Array, fileName = "the file"): Promise<RawTable> {
  try {
    await checkXlsxBounds(bytes, fileName, READINGS_XLSX_LIMITS);
  } catch (error) {
    if (error instanceof XlsxBoundsError) throw new Refusal(error.message);
    throw error;
  }
  const wb = new ExcelJS.Workbook();
  try {
    await wb.xlsx.load(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer);
  } catch (error) {
    throw new Refusal(`${fileName} could not be opened as an .xlsx workbook (${(error as Error).message}). Save it again from your spreadsheet as .xlsx or CSV.`);
  }
  const skipped: string[] = [];
  for (const ws of wb.worksheets) {
    const table = sheetTable(ws);
    const shape = describeTable(table);
    if (shape && numericColumns(shape).length >= 2) {
      if (skipped.length) table.notes.push(`Sheet${skipped.length > 1 ? "s" : ""} ${skipped.map((s) => `"${s}"`).join(", ")} held no pair of numeric columns and ${skipped.length > 1 ? "were" : "was"} skipped.`);
      return table;
    }
    skipped.push(ws.name);
  }
  throw new Refusal(
    wb.worksheets.length === 0
      ? `${fileName} has no sheets.`
      : `No sheet of ${fileName} has two columns of numbers (a time and a reading). Sheets looked at: ${skipped.map((s) => `"${s}"`).join(", ")}.`,
  );
}

function sheetTable(ws: ExcelJS.Worksheet): RawTable {
  const grid: Array<{ rowNumber: number; values: Array<number | string | Date | null> }> = [];
  let width = 0;
  ws.eachRow({ includeEmpty: true }, (row, rowNumber) => {
    const values: Array<number | string | Date | null> = [];
    row.eachCell({ includeEmpty: true }, (cell, col) => {
      values[col - 1] = plain(cell.value);
    });
    for (let i = 0; i < values.length; i++) if (values[i] === undefined) values[i] = null;
    width = Math.max(width, values.length);
    grid.push({ rowNumber, values });
  });
  // Date cells (a date, a time of day, a duration): seconds since the column's first date.
  const elapsedColumns: number[] = [];
  for (let c = 0; c < width; c++) {
    const first = grid.find((r) => r.values[c] instanceof Date)?.values[c] as Date | undefined;
    if (first) elapsedColumns.push(c);
  }
  const firstDate = new Map<number, number>();
  const rows = grid.map(({ rowNumber, values }) => ({
    rowNumber,
    cells: values.map((v, c): Cell => {
      if (v instanceof Date) {
        if (!firstDate.has(c)) firstDate.set(c, v.getTime());
        return (v.getTime() - firstDate.get(c)!) / 1000;
      }
      return v;
    }),
  }));
  // Blank rows between filled ones are kept so that row numbers match the sheet.
  const notes = [`Read sheet "${ws.name}"; formulas by their saved values.`];
  if (elapsedColumns.length) {
    const letters = elapsedColumns.map((c) => String.fromCharCode(65 + (c % 26))).join(", ");
    notes.push(`Column${elapsedColumns.length > 1 ? "s" : ""} ${letters} held clock times or dates, turned into seconds elapsed since the first one.`);
  }
  const table: RawTable = { source: "xlsx", rows, notes, decimalComma: false, elapsedColumns, sheetName: ws.name };
  // Numbers typed as text with a decimal comma ("1,5") in an otherwise numeric sheet.
  let comma = 0;
  for (const r of rows) for (const cell of r.cells) if (typeof cell === "string" && cellNumber(cell, false) === null && cellNumber(cell, true) !== null) comma++;
  if (comma > 0) table.decimalComma = true;
  return table;
}
