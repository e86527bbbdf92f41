// Hostile spreadsheets (issue 15): tiny .xlsx files whose addresses reach far rows or columns used
// to make exceljs build every empty cell up to them and exhaust the heap. The files are made here,
// by rewriting the sheet XML of an ordinary workbook; each must be refused quickly, naming the limit.
import { describe, expect, test } from "vitest";
import ExcelJS from "exceljs";
import JSZip from "jszip";
import { readCsv, Refusal } from "~/lib/readings/csv";
import { checkCsvBounds, READINGS_CSV_LIMITS } from "~/lib/readings/csv-bounds";
import { readReadingsFile } from "~/.server/readings/read.server";
import { readTable, RosterFileError } from "~/.server/planning/roster.server";
import { checkSheetXml, READINGS_XLSX_LIMITS } from "~/.server/readings/xlsx-bounds.server";
import { FULL_LOAD_CELLS } from "~/.server/readings/xlsx.server";

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

// generous timeouts: the files are big to make, and the machine is shared (speed is benched, not tested)
describe("hostile .xlsx files are refused before anything is built", { timeout: 60_000 }, () => {
  test("a cell in the last column on 2,000 rows: readings upload and preview", async () => {
    const bytes = await workbookWithSheet(lastColumnRows(2000));
    expect(bytes.length).toBeLessThan(100_000);
    const t0 = Date.now();
    const e = await rejection(readReadingsFile(bytes, "wide.xlsx"));
    expect(e).toBeInstanceOf(Refusal);
    expect(e.message).toMatch(/wide\.xlsx, sheet "Readings" has a cell in column 16,384 \(XFD4\); at most 200 columns are read/);
    expect(Date.now() - t0).toBeLessThan(5000);
  });

  test("one row numbered 20,000,000: readings", async () => {
    const bytes = await workbookWithSheet(farRow);
    const e = await rejection(readReadingsFile(bytes, "far.xlsx"));
    expect(e).toBeInstanceOf(Refusal);
    expect(e.message).toMatch(/far\.xlsx, sheet "Readings" has a row numbered 20,000,000; at most 100,000 rows are read/);
  });

  test("a dimension claiming a huge sheet is refused from the dimension alone", async () => {
    const bytes = await workbookWithSheet((b) => b.replace(/<dimension[^>]*\/>/, '<dimension ref="A1:XFD1048576"/>'));
    const e = await rejection(readReadingsFile(bytes, "dim.xlsx"));
    expect(e.message).toMatch(/reaches row 1,048,576 \(its dimension\)/);
  });

  test("roster imports are bounded too", async () => {
    const e1 = await rejection(readTable("roster.xlsx", await workbookWithSheet(farRow)));
    expect(e1).toBeInstanceOf(RosterFileError);
    expect(e1.message).toMatch(/roster\.xlsx, sheet "Readings" has a row numbered 20,000,000; at most 20,000 rows/);
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

  test("a merged range over 20 million cells (inside the row and column limits) is refused, not built", async () => {
    const bytes = await workbookWithSheet((b) => b.replace("</sheetData>", '</sheetData><mergeCells count="1"><mergeCell ref="A5:GR100000"/></mergeCells>'));
    const e = await rejection(readReadingsFile(bytes, "merged.xlsx"));
    expect(e).toBeInstanceOf(Refusal);
    expect(e.message).toMatch(/merged\.xlsx, sheet "Readings" has merged ranges covering more than 1,000,000 cells/);
  });

  test("a data-validation range over the whole readings area is refused, not built", async () => {
    const dv = '<dataValidations count="1"><dataValidation type="decimal" sqref="A1:GR100000"><formula1>0</formula1></dataValidation></dataValidations>';
    const bytes = await workbookWithSheet((b) => b.replace("</sheetData>", `</sheetData>${dv}`));
    const e = await rejection(readReadingsFile(bytes, "valid.xlsx"));
    expect(e.message).toMatch(/valid\.xlsx, sheet "Readings" has data-validation ranges covering more than 1,000,000 cells/);
  });

  test("a column range to column 2,000,000,000 is refused (exceljs makes an object per column)", async () => {
    const bytes = await workbookWithSheet((b) => b.replace("<sheetData>", '<cols><col min="1" max="2000000000" width="9"/></cols><sheetData>'));
    const e = await rejection(readReadingsFile(bytes, "cols.xlsx"));
    expect(e.message).toMatch(/cols\.xlsx, sheet "Readings" defines columns up to number 2,000,000,000; a sheet has at most 16,384/);
  });

  test("cells are counted over all sheets together", async () => {
    const wb = new ExcelJS.Workbook();
    for (let s = 0; s < 3; s++) wb.addWorksheet(`S${s + 1}`).addRow([1, 2]);
    const zip = await JSZip.loadAsync(new Uint8Array(await wb.xlsx.writeBuffer()));
    // 2,500 rows reaching column 160 (FD): 400,000 cells a sheet, under the limit one by one
    const data = Array.from({ length: 2500 }, (_, i) => `<row r="${i + 1}"><c r="FD${i + 1}"><v>1</v></c></row>`).join("");
    for (let s = 1; s <= 3; s++) {
      const path = `xl/worksheets/sheet${s}.xml`;
      zip.file(path, (await zip.file(path)!.async("string")).replace(/<dimension[^>]*\/>/, "").replace(/<sheetData>.*<\/sheetData>/s, `<sheetData>${data}</sheetData>`));
    }
    const bytes = await zip.generateAsync({ type: "uint8array", compression: "DEFLATE" });
    const e = await rejection(readReadingsFile(bytes, "sheets.xlsx"));
    expect(e.message).toMatch(/sheets\.xlsx, sheet "S3" spans more than 1,000,000 cells .*from all sheets together/);
  });

  test("declared sizes that lie do not let a sheet inflate past the limit", async () => {
    // 70 MiB of blank space in the sheet XML deflates to about 70 kB; the zip then claims 100 bytes
    const bytes = await workbookWithSheet((b) => b.replace("<sheetData>", `<sheetData>${" ".repeat(70 * 1024 * 1024)}`));
    const lie = Buffer.from(bytes);
    const name = Buffer.from("xl/worksheets/sheet1.xml");
    for (let at = lie.indexOf(name); at >= 0; at = lie.indexOf(name, at + 1)) {
      // local header (PK\x03\x04): sizes 8 bytes before the name's length field; central (PK\x01\x02) the same
      const local = lie.readUInt32LE(at - 30) === 0x04034b50;
      const central = lie.readUInt32LE(at - 46) === 0x02014b50;
      if (local) lie.writeUInt32LE(100, at - 30 + 22);
      if (central) lie.writeUInt32LE(100, at - 46 + 24);
    }
    const e = await rejection(readReadingsFile(new Uint8Array(lie), "bomb.xlsx"));
    expect(e.message).toMatch(/bomb\.xlsx, sheet "Readings" unpacks to more than 48 MiB; at most 48 MiB per sheet are read/);
  });

  test("a large honest workbook is read row by row and gives the same table as the full reader", async () => {
    const make = async (rows: number) => {
      const wb = new ExcelJS.Workbook();
      wb.addWorksheet("Notes").addRow(["invented demo run"]);
      const ws = wb.addWorksheet("Logger");
      ws.addRow(["clock", "kappa (mS/cm)", "note"]);
      const t0 = Date.UTC(1899, 11, 30, 9, 0, 0);
      for (let i = 0; i < rows; i++) ws.addRow([new Date(t0 + i * 1000), { formula: `${i}/1000`, result: i / 1000 }, i % 1000 === 0 ? "mark" : null]);
      ws.getColumn(1).numFmt = "hh:mm:ss";
      ws.spliceRows(5, 1); // a blank row inside the data: row numbers must still match the sheet
      ws.insertRow(5, []);
      return readReadingsFile(new Uint8Array(await wb.xlsx.writeBuffer()), "logger.xlsx");
    };
    const big = await make(40_000); // 120,000 cells: the streaming reader
    expect(3 * 40_000).toBeGreaterThan(FULL_LOAD_CELLS);
    const small = await make(1_000); // the full reader
    expect(big.sheetName).toBe("Logger");
    expect(big.notes).toEqual(small.notes);
    expect(big.rows.slice(0, 1001).map((r) => [r.rowNumber, r.cells])).toEqual(small.rows.map((r) => [r.rowNumber, r.cells]));
    expect(big.rows.length).toBe(40_001);
    expect(big.rows[4].cells.every((c) => c === null)).toBe(true);
    expect(big.rows[40_000]).toEqual({ rowNumber: 40_001, cells: [39_999, 39.999] });
  });
});

// Small CSVs that froze the server (issue 15): a 420 kB header of 20,000 columns, a 4.8 MB single
// line. Each is refused by the bound scan before papaparse or the table analysis sees it; how fast
// is measured by scripts/bench/hostile-uploads.ts, not here.
describe("hostile CSV files are refused before the table is analysed", { timeout: 60_000 }, () => {
  const header = (cols: number) => Array.from({ length: cols }, (_, i) => `reading_${String(i).padStart(12, "0")}`).join(",");

  test("a 420 kB header of 20,000 columns: refused at column 201 of row 1", () => {
    const text = `${header(20_000)}\n${Array.from({ length: 5 }, (_, r) => `${r},${r / 10}`).join("\n")}\n`;
    expect(text.length).toBeGreaterThan(400_000);
    expect(() => readCsv(new TextEncoder().encode(text), "wide.csv")).toThrow(
      /^wide\.csv, row 1: more than 200 columns \(column GS is number 201\); at most 200 columns are read/,
    );
  });

  test("a 4.8 MB single line of numbers: refused by its columns; without separators by its field", () => {
    const numbers = Array.from({ length: 800_000 }, (_, i) => (i % 997) / 7).map((x) => x.toFixed(2)).join(",").slice(0, 4_800_000);
    expect(() => readCsv(new TextEncoder().encode(numbers), "line.csv")).toThrow(/^line\.csv, row 1: more than 200 columns/);
    const blob = "7".repeat(4_800_000);
    expect(() => readCsv(new TextEncoder().encode(`t,c\n${blob}\n`), "blob.csv")).toThrow(
      /^blob\.csv, row 2, column A: a field of 2,001 characters; at most 2,000 characters a field are read/,
    );
  });

  test("a line under the column limit but too long, an unclosed quote, too many rows", () => {
    const long = Array.from({ length: 150 }, () => "9".repeat(300)).join(";");
    expect(() => readCsv(new TextEncoder().encode(`t;c\n0;1\n${long}\n`), "long.csv")).toThrow(/^long\.csv, row 3: a line longer than 32,768 characters/);
    const open = `t,c\n0,1\n1,"2\n${"3,4\n".repeat(1000)}`;
    expect(() => readCsv(new TextEncoder().encode(open), "quote.csv")).toThrow(/^quote\.csv, row 3, column B: a quoted field runs past 2,000 characters \(is its closing quote missing\?\)/);
    const many = `t,c\n${Array.from({ length: 100_001 }, (_, i) => `${i},1`).join("\n")}`;
    expect(() => readCsv(new TextEncoder().encode(many), "rows.csv")).toThrow(/^rows\.csv has more than 100,000 rows \(row 100,001 and on\)/);
  });

  test("rows are counted as the reader counts them (quoted line breaks, Windows line ends)", () => {
    const text = 't,"note\r\nsecond line"\r\n0,1\r\n1,2\r\n';
    expect(checkCsvBounds(text, ",", "f.csv", READINGS_CSV_LIMITS)).toEqual({ rows: 3, columns: 2 });
    const t = readCsv(new TextEncoder().encode(text), "f.csv");
    expect(t.rows.filter((r) => r.cells.some((c) => c !== null)).length).toBe(3);
    // row 3 is where the fourth column appears
    expect(() => checkCsvBounds(text.replace("1,2", "1,2,3,4"), ",", "f.csv", { ...READINGS_CSV_LIMITS, maxColumns: 3 })).toThrow(/^f\.csv, row 3: more than 3 columns \(column D is number 4\)/);
  });

  test("an honest 200-column, 100,000-row limit file is not refused by the scan", () => {
    const row = Array.from({ length: 200 }, (_, i) => i).join(",");
    const text = `${row}\n`.repeat(100_000);
    expect(checkCsvBounds(text, ",", "ok.csv", READINGS_CSV_LIMITS)).toEqual({ rows: 100_000, columns: 200 });
  });

  test("roster CSVs are bounded too", async () => {
    const e = await rejection(readTable("roster.csv", new TextEncoder().encode(`${header(20_000)}\n`)));
    expect(e).toBeInstanceOf(RosterFileError);
    expect(e.message).toMatch(/^roster\.csv, row 1: more than 50 columns/);
  });
});
