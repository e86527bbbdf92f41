// An .xlsx workbook into a table of cells, through exceljs: the first sheet that holds a pair of
// numeric columns, formulas read by the value the spreadsheet cached when it was saved, and dates
// or times of day turned into seconds elapsed since the first reading of that column.
import ExcelJS from "exceljs";
import { Refusal, type ReadOptions } from "~/lib/readings/csv";
import { convertTimeColumns, elapsedTimes, sheetTimeValue, type TimeValue } from "~/lib/readings/clock-times";
import { Readable } from "node:stream";
import { checkXlsxBounds, READINGS_XLSX_LIMITS, XlsxBoundsError, type CheckedWorkbook } from "./xlsx-bounds.server";
import { cellNumber, columnLetter, describeTable, numericColumns, type Cell, type RawTable } from "~/lib/readings/table";

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

/** Workbooks whose sheets hold more cells than this are read row by row (exceljs's streaming reader). */
export const FULL_LOAD_CELLS = 50_000;

interface GridRow {
  rowNumber: number;
  values: Array<number | string | Date | null> & { uncalculated?: number };
}

/** A formula cell without a cached result (written by a program that does not calculate). */
function isUncalculated(v: Value): boolean {
  return !!v && typeof v === "object" && ("formula" in v || "sharedFormula" in v) && (v as ExcelJS.CellFormulaValue).result === undefined;
}

function rowValues(row: ExcelJS.Row): GridRow["values"] {
  const values: GridRow["values"] = [];
  row.eachCell({ includeEmpty: true }, (cell, col) => {
    values[col - 1] = plain(cell.value);
    if (isUncalculated(cell.value)) values.uncalculated = (values.uncalculated ?? 0) + 1;
  });
  for (let i = 0; i < values.length; i++) if (values[i] === undefined) values[i] = null;
  return values;
}

/** Small workbooks: exceljs's full reader (it also fills merged cells with their first value). */
async function* fullSheets(archive: Uint8Array, fileName: string): AsyncGenerator<{ name: string; grid: GridRow[] }> {
  const wb = new ExcelJS.Workbook();
  try {
    await wb.xlsx.load(archive.buffer.slice(archive.byteOffset, archive.byteOffset + archive.byteLength) as ArrayBuffer);
  } catch (error) {
    throw new Refusal(`${fileName} could not be opened as an .xlsx workbook (${(error as Error).message}). Save it again from your spreadsheet as .xlsx or CSV.`);
  }
  for (const ws of wb.worksheets) {
    const grid: GridRow[] = [];
    ws.eachRow({ includeEmpty: true }, (row, rowNumber) => grid.push({ rowNumber, values: rowValues(row) }));
    yield { name: ws.name, grid };
  }
}

/** Large workbooks: one row at a time, so memory holds the plain values only, never exceljs's objects for the sheet. */
async function* streamedSheets(checked: CheckedWorkbook, fileName: string): AsyncGenerator<{ name: string; grid: GridRow[] }> {
  const unaddressed = checked.sheets.find((s) => !s.scan.addressed);
  if (unaddressed) {
    throw new Refusal(
      `${fileName}, sheet "${unaddressed.name}": the workbook holds more than ${FULL_LOAD_CELLS.toLocaleString("en")} cells and this sheet's rows or cells are written without their addresses (A1, B2, ...), which only smaller workbooks may be. Open it in a spreadsheet program and save it again as .xlsx, or save the readings as CSV.`,
    );
  }
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(Readable.from([checked.archive]), {
    worksheets: "emit",
    sharedStrings: "cache",
    styles: "cache",
    hyperlinks: "ignore",
    entries: "ignore",
  });
  let i = 0;
  try {
    for await (const ws of reader) {
      const grid: GridRow[] = [];
      for await (const row of ws as AsyncIterable<ExcelJS.Row>) {
        // rows the sheet leaves out are blank: kept so that row numbers match the sheet
        for (let n = (grid.at(-1)?.rowNumber ?? 0) + 1; n < row.number; n++) grid.push({ rowNumber: n, values: [] });
        grid.push({ rowNumber: row.number, values: rowValues(row) });
      }
      yield { name: checked.sheets[i++]?.name ?? `Sheet${i}`, grid };
    }
  } catch (error) {
    if (error instanceof Refusal) throw error;
    throw new Refusal(`${fileName} could not be opened as an .xlsx workbook (${(error as Error).message}). Save it again from your spreadsheet as .xlsx or CSV.`);
  }
}

export async function readXlsx(bytes: Uint8Array, fileName = "the file", options: ReadOptions = {}): Promise<RawTable> {
  let checked: CheckedWorkbook;
  try {
    checked = await checkXlsxBounds(bytes, fileName, READINGS_XLSX_LIMITS);
  } catch (error) {
    if (error instanceof XlsxBoundsError) throw new Refusal(error.message);
    throw error;
  }
  if (checked.sheets.length === 0) throw new Refusal(`${fileName} has no sheets.`);
  const sheets = checked.span <= FULL_LOAD_CELLS ? fullSheets(checked.archive, fileName) : streamedSheets(checked, fileName);
  const skipped: string[] = [];
  let uncalculated = 0;
  for await (const { name, grid } of sheets) {
    for (const r of grid) uncalculated += r.values.uncalculated ?? 0;
    const table = sheetTable(name, grid, options.start ?? null);
    const shape = describeTable(table);
    if (shape && numericColumns(shape).length >= 2) {
      if (skipped.length) table.notes.push(`Sheet${skipped.length > 1 ? "s" : ""} ${skipped.map((s) => `"${s}"`).join(", ")} held no pair of numeric columns and ${skipped.length > 1 ? "were" : "was"} skipped.`);
      return table;
    }
    skipped.push(name);
  }
  if (uncalculated > 0) {
    throw new Refusal(
      `${fileName}: ${uncalculated} cell(s) hold formulas that were never calculated, so the workbook has no saved values to read (it was written by a program that does not calculate them). Open it in a spreadsheet, let it recalculate, and save it again as .xlsx, or save the readings as CSV.`,
    );
  }
  throw new Refusal(
    skipped.length === 0
      ? `${fileName} has no sheets.`
      : `No sheet of ${fileName} has two columns of numbers (a time and a reading). Sheets looked at: ${skipped.map((s) => `"${s}"`).join(", ")}.`,
  );
}

function sheetTable(sheetName: string, grid: GridRow[], start: number | null): RawTable {
  let width = 0;
  for (const r of grid) width = Math.max(width, r.values.length);
  // Date cells (a date, a time of day, a duration): seconds elapsed, by the same rules as CSV
  // times (app/lib/readings/clock-times.ts), each column with a note saying how.
  const elapsedColumns: number[] = [];
  const notes = [`Read sheet "${sheetName}"; formulas by their saved values.`];
  const converted = new Map<number, Map<number, number>>();
  for (let c = 0; c < width; c++) {
    const values: TimeValue[] = [];
    let firstAt = -1;
    grid.forEach((r, i) => {
      const v = r.values[c];
      if (v instanceof Date) {
        if (firstAt < 0) firstAt = i;
        values.push(sheetTimeValue(v, r.rowNumber));
      }
    });
    if (!values.length) continue;
    const above = grid.slice(Math.max(0, firstAt - 2), firstAt).map((r) => r.values[c]).filter((x): x is string => typeof x === "string" && x.trim() !== "");
    const name = above[0] ? `column ${columnLetter(c)} (${above[0].trim()})` : `column ${columnLetter(c)}`;
    const { seconds, note } = elapsedTimes(values, name, above.join(" "), start);
    converted.set(c, seconds);
    elapsedColumns.push(c);
    notes.push(note);
  }
  const rows = grid.map(({ rowNumber, values }) => ({
    rowNumber,
    cells: values.map((v, c): Cell => (v instanceof Date ? (converted.get(c)?.get(rowNumber) ?? null) : v)),
  }));
  // Times typed as text ("03:00", "14:05:00") read as in a CSV file.
  const typed = convertTimeColumns(rows, start);
  elapsedColumns.push(...typed.columns);
  notes.push(...typed.notes);
  // Blank rows between filled ones are kept so that row numbers match the sheet.
  const table: RawTable = { source: "xlsx", rows, notes, decimalComma: false, elapsedColumns, sheetName };
  // Numbers typed as text with a decimal comma ("1,5") in an otherwise numeric sheet.
  let comma = 0;
  for (const r of rows) for (const cell of r.cells) if (typeof cell === "string" && cellNumber(cell, false) === null && cellNumber(cell, true) !== null) comma++;
  if (comma > 0) table.decimalComma = true;
  return table;
}
