// Hostile spreadsheets (issue 15): tiny .xlsx files whose addresses reach far rows or columns used
// to make exceljs build every empty cell up to them and exhaust the heap. The files are made here,
// by rewriting the sheet XML of an ordinary workbook; each must be refused quickly, naming the limit.
import { describe, expect, test } from "vitest";
import ExcelJS from "exceljs";
import JSZip from "jszip";
import { Refusal } from "~/lib/readings/csv";
import { readReadingsFile } from "~/.server/readings/read.server";
import { readTable, RosterFileError } from "~/.server/planning/roster.server";
import { checkSheetXml, READINGS_XLSX_LIMITS } from "~/.server/readings/xlsx-bounds.server";

async function workbookWithSheet(sheetXml: (base: string) => string): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet("Readings");
  ws.addRow(["t / s", "A / (mol/L)"]);
  ws.addRow([0, 0.1]);
  ws.addRow([60, 0.08]);
  const zip = await JSZip.loadAsync(new Uint8Array(await wb.xlsx.writeBuffer()));
  const path = "xl/worksheets/sheet1.xml";
  zip.file(path, sheetXml(await zip.file(path)!.async("string")));
  return zip.generateAsync({ type: "uint8array", compression: "DEFLATE" });
}

/** A cell in the last column (XFD) on each of `rows` rows, with no <dimension> to warn. */
const lastColumnRows = (rows: number) => (base: string) => {
  const data = Array.from({ length: rows }, (_, i) => `<row r="${i + 4}"><c r="XFD${i + 4}"><v>1</v></c></row>`).join("");
  return base.replace(/<dimension[^>]*\/>/, "").replace("</sheetData>", `${data}</sheetData>`);
};
/** One extra row numbered 20,000,000. */
const farRow = (base: string) => base.replace(/<dimension[^>]*\/>/, "").replace("</sheetData>", `<row r="20000000"><c r="A20000000"><v>5</v></c></row></sheetData>`);

async function rejection(p: Promise<unknown>): Promise<Error> {
  try {
    await p;
  } catch (e) {
    return e as Error;
  }
  throw new Error("expected a refusal");
}

describe("hostile .xlsx files are refused before anything is built", () => {
  test("a cell in the last column on 2,000 rows: readings upload and preview", async () => {
    const bytes = await workbookWithSheet(lastColumnRows(2000));
    expect(bytes.length).toBeLessThan(100_000);
    const t0 = Date.now();
    const e = await rejection(readReadingsFile(bytes, "wide.xlsx"));
    expect(e).toBeInstanceOf(Refusal);
    expect(e.message).toMatch(/wide\.xlsx, sheet file sheet1 has a cell in column 16,384 \(XFD4\); at most 200 columns are read/);
    expect(Date.now() - t0).toBeLessThan(5000);
  });

  test("one row numbered 20,000,000: readings", async () => {
    const bytes = await workbookWithSheet(farRow);
    const e = await rejection(readReadingsFile(bytes, "far.xlsx"));
    expect(e).toBeInstanceOf(Refusal);
    expect(e.message).toMatch(/far\.xlsx, sheet file sheet1 has a row numbered 20,000,000; at most 100,000 rows are read/);
  });

  test("a dimension claiming a huge sheet is refused from the dimension alone", async () => {
    const bytes = await workbookWithSheet((b) => b.replace(/<dimension[^>]*\/>/, '<dimension ref="A1:XFD1048576"/>'));
    const e = await rejection(readReadingsFile(bytes, "dim.xlsx"));
    expect(e.message).toMatch(/reaches row 1,048,576 \(its dimension\)/);
  });

  test("roster imports are bounded too", async () => {
    const e1 = await rejection(readTable("roster.xlsx", await workbookWithSheet(farRow)));
    expect(e1).toBeInstanceOf(RosterFileError);
    expect(e1.message).toMatch(/roster\.xlsx, sheet file sheet1 has a row numbered 20,000,000; at most 20,000 rows/);
    const e2 = await rejection(readTable("roster.xlsx", await workbookWithSheet(lastColumnRows(10))));
    expect(e2.message).toMatch(/column 16,384.*at most 50 columns/);
  });

  test("many cells under the row and column limits are refused by the cell limit", () => {
    const row = (r: number) => `<row r="${r}"><c r="GR${r}"><v>1</v></c></row>`; // column 200
    const xml = `<worksheet><sheetData>${Array.from({ length: 6000 }, (_, i) => row(i + 1)).join("")}</sheetData></worksheet>`;
    expect(() => checkSheetXml(xml, "cells.xlsx", READINGS_XLSX_LIMITS)).toThrow(/at most 1,000,000 cells are read/);
  });

  test("an ordinary workbook still reads", async () => {
    const bytes = await workbookWithSheet((b) => b);
    const table = await readReadingsFile(bytes, "fine.xlsx");
    expect(table.rows.length).toBe(3);
  });
});
