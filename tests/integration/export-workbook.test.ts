// The spreadsheet building blocks: numbers stay numbers, units sit in the headers, the header row
// is frozen, widths are set, and a real spreadsheet program (LibreOffice) reads back the same
// values; the CSV has its byte-order mark and RFC 4180 quoting.
import ExcelJS from "exceljs";
import Papa from "papaparse";
import { describe, expect, test } from "vitest";
import { addTableSheet, attachment, downloadName, newWorkbook, sheetName, workbookBytes } from "~/.server/exports/workbook.server";
import { plainNumber, toCsv, type SheetColumn } from "~/lib/exports/table";
import { libreOfficeSheets } from "../setup/libreoffice";

interface Row {
  id: string;
  name: string;
  k: number | null;
  mark: number;
  released: boolean;
}

const columns: SheetColumn<Row>[] = [
  { header: "Student ID", kind: "text", value: (r) => r.id },
  { header: "Name", kind: "text", value: (r) => r.name, width: 30 },
  { header: "k", unit: "L/(mol·s)", kind: "number", numFmt: "0.000E+00", value: (r) => r.k },
  { header: "Mark", unit: "%", kind: "number", numFmt: "0.0", value: (r) => r.mark },
  { header: "Released", kind: "boolean", value: (r) => r.released },
];

// Invented rows: an ID with leading zeros (must stay text), accents, a name a spreadsheet would
// run as a formula, a comma and a quote, a k that could not be computed.
const rows: Row[] = [
  { id: "00042", name: "Zoë Łukasik-Ørsted", k: 1.23456789e-4, mark: 87.25, released: true },
  { id: "S-7", name: "=HYPERLINK(\"x\")", k: null, mark: 0, released: false },
  { id: "S-8", name: 'Rae "Ray" Quill, Jr', k: 0.0151, mark: 64.5, released: true },
];

describe("export workbook building blocks", () => {
  test("exceljs reads back every cell with its value and type, the header frozen and widths set", async () => {
    const wb = newWorkbook("test");
    const used = new Set<string>();
    addTableSheet(wb, used, "Marks", columns, rows);
    addTableSheet(wb, used, "Marks", columns, [], { emptyNote: "No submissions yet." });
    const back = new ExcelJS.Workbook();
    await back.xlsx.load((await workbookBytes(wb)) as never);
    const [marks, empty] = back.worksheets;
    expect(marks.name).toBe("Marks");
    expect(empty.name).toBe("Marks (2)");
    expect(marks.getRow(1).values).toEqual([undefined, "Student ID", "Name", "k (L/(mol·s))", "Mark (%)", "Released"]);
    expect(marks.views[0]).toMatchObject({ state: "frozen", ySplit: 1 });
    expect(marks.getColumn(2).width).toBe(30);
    for (let c = 1; c <= columns.length; c++) expect(marks.getColumn(c).width, `column ${c}`).toBeGreaterThan(0);
    expect(marks.getCell("A2").value).toBe("00042");
    expect(marks.getCell("A2").type).toBe(ExcelJS.ValueType.String);
    expect(marks.getCell("C2").value).toBe(1.23456789e-4);
    expect(marks.getCell("C2").type).toBe(ExcelJS.ValueType.Number);
    expect(marks.getCell("C2").numFmt).toBe("0.000E+00");
    expect(marks.getCell("D2").type).toBe(ExcelJS.ValueType.Number);
    expect(marks.getCell("E2").value).toBe(true);
    expect(marks.getCell("B3").value).toBe('=HYPERLINK("x")'); // text, never a formula
    expect(marks.getCell("B3").type).toBe(ExcelJS.ValueType.String);
    expect(marks.getCell("C3").type).toBe(ExcelJS.ValueType.Null);
    let formulas = 0;
    back.eachSheet((ws) => ws.eachRow((r) => r.eachCell((cell) => void (cell.type === ExcelJS.ValueType.Formula && formulas++))));
    expect(formulas).toBe(0);
    expect(empty.getCell("A2").value).toBe("No submissions yet.");
    expect(empty.getRow(1).values).toEqual(marks.getRow(1).values);
  });

  test("LibreOffice opens it and reads the same numbers, text and booleans", async () => {
    const wb = newWorkbook("test");
    addTableSheet(wb, new Set(), "Marks", columns, rows);
    const sheets = libreOfficeSheets(await workbookBytes(wb), ["Marks"]);
    const read = sheets.Marks;
    expect(read[0]).toEqual(["Student ID", "Name", "k (L/(mol·s))", "Mark (%)", "Released"]);
    expect(read[1]).toEqual(["00042", "Zoë Łukasik-Ørsted", "0.000123456789", "87.25", "TRUE"]);
    expect(read[2]).toEqual(["S-7", '=HYPERLINK("x")', "", "0", "FALSE"]);
    expect(Number(read[3][2])).toBe(0.0151);
    // What LibreOffice reads from the workbook is what our own CSV says, cell for cell, once the
    // CSV's formula guard (a leading apostrophe) is set aside.
    const ours = Papa.parse<string[]>(toCsv(columns, rows).slice(1), { skipEmptyLines: true }).data.map((r) => r.map((c) => c.replace(/^'(?=[=+\-@])/, "")));
    expect(read).toEqual(ours);
  });

  test("CSV: BOM, CRLF, quoting, formula guard, empty cells for what could not be computed", () => {
    const csv = toCsv(columns, rows);
    expect(csv.charCodeAt(0)).toBe(0xfeff);
    const lines = csv.slice(1).split("\r\n");
    expect(lines[0]).toBe("Student ID,Name,k (L/(mol·s)),Mark (%),Released");
    expect(lines[1]).toBe("00042,Zoë Łukasik-Ørsted,0.000123456789,87.25,TRUE");
    expect(lines[2]).toBe(`S-7,"'=HYPERLINK(""x"")",,0,FALSE`);
    expect(lines[3]).toBe(`S-8,"Rae ""Ray"" Quill, Jr",0.0151,64.5,TRUE`);
    expect(toCsv(columns, [], "No submissions yet.").slice(1).split("\r\n")[1]).toBe("No submissions yet.");
    // Numbers in plain decimal form, never an exponent (String(1.5e-7) is "1.5e-7"), and they read back exactly.
    const tiny = toCsv(columns, [{ ...rows[0], k: 1.5e-7 }]).slice(1).split("\r\n")[1];
    expect(tiny).toBe("00042,Zoë Łukasik-Ørsted,0.00000015,87.25,TRUE");
    for (const n of [1.5e-7, -2.5e-9, 6.02214076e23, 1e21, 0.1, 0, 123.456]) expect(Number(plainNumber(n)), String(n)).toBe(n);
    expect(plainNumber(-2.5e-9)).toBe("-0.0000000025");
    expect(plainNumber(6.02214076e23)).toBe("602214076000000000000000");
  });

  test("sheet and file names are safe", () => {
    const used = new Set<string>();
    expect(sheetName("Practical 3: rates [draft]/v2?", used)).toBe("Practical 3- rates -draft--v2-");
    expect(sheetName("A".repeat(40), used)).toHaveLength(31);
    expect(sheetName("A".repeat(40), used)).toBe("A".repeat(27) + " (2)");
    expect(downloadName(["KIN-DEMO", "Rates/Ea: term 1"], new Date("2026-12-02T10:00:00Z"), "xlsx")).toBe("KIN-DEMO - Rates Ea term 1 - 2026-12-02.xlsx");
    expect(attachment("Zoë marks.csv")).toBe(`attachment; filename="Zoe marks.csv"; filename*=UTF-8''Zo%C3%AB%20marks.csv`);
  });
});
