// Readings files as groups send them: each CSV quirk, spreadsheets, and each refusal.
// The expected numbers are the ones written in the files themselves.
import { describe, expect, test } from "vitest";
import ExcelJS from "exceljs";
import { readCsv, Refusal, binaryKind } from "~/lib/readings/csv";
import { extractPoints, guessColumns, concentrationUnitFrom, timeUnitFrom } from "~/lib/readings/extract";
import { cellNumber, splitHeader, describeTable, columnLetter } from "~/lib/readings/table";
import { readReadingsFile } from "~/.server/readings/read.server";
import { parseStart } from "~/lib/readings/clock-times";

const enc = (s: string) => new TextEncoder().encode(s);
const csv = (s: string) => extractPoints(readCsv(enc(s), "run.csv"), {}, "run.csv");

function refusal(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    if (e instanceof Refusal) return e.message;
    throw e;
  }
  throw new Error("expected a refusal");
}
async function refusalAsync(p: Promise<unknown>): Promise<string> {
  try {
    await p;
  } catch (e) {
    if (e instanceof Refusal) return e.message;
    throw e;
  }
  throw new Error("expected a refusal");
}

describe("CSV quirks", () => {
  test("comma separated with a header carrying units", () => {
    const r = csv("t / min,CA (mmol/L)\n0,20.0\n5,15.2\n10,12.1\n15,10.0\n");
    expect(r.points).toEqual([[0, 20], [5, 15.2], [10, 12.1], [15, 10]]);
    expect(r.time.unit).toBe("min");
    expect(r.value.unit).toBe("mmol/L");
    expect(r.rowNumbers).toEqual([2, 3, 4, 5]);
  });

  test("semicolons with a decimal comma", () => {
    const r = csv("t / min;kappa (mS/cm)\n0;2,45\n2;2,31\n4;2,19\n6;2,08\n");
    expect(r.points).toEqual([[0, 2.45], [2, 2.31], [4, 2.19], [6, 2.08]]);
    expect(r.notes[0]).toMatch(/semicolons, decimal comma/);
  });

  test("tabs with a decimal comma and an exponent", () => {
    const r = csv("time\tconc\n0\t1,5E-02\n60\t1,2E-02\n120\t1,0E-02\n180\t8,5E-03\n");
    expect(r.points.map((p) => p[1])).toEqual([0.015, 0.012, 0.01, 0.0085]);
  });

  test("no header row", () => {
    const r = csv("0,0.020\n30,0.017\n60,0.015\n90,0.013\n120,0.012\n");
    expect(r.shape.headerRow).toBe(-1);
    expect(r.points.length).toBe(5);
    expect(r.rowNumbers[0]).toBe(1);
  });

  test("byte-order mark, Windows line ends, blank lines and extra columns", () => {
    const text = "\uFEFFsample;t / s;c (mol/L);note\r\n\r\n1;0;0,0200;start\r\n2;60;0,0171;\r\n\r\n3;120;0,0150;cloudy\r\n4;180;0,0133;\r\n";
    const r = csv(text);
    // the sample number is numeric too; the time column is the one named t with a time unit
    expect(r.time.header).toBe("t / s");
    expect(r.value.header).toBe("c (mol/L)");
    expect(r.points).toEqual([[0, 0.02], [60, 0.0171], [120, 0.015], [180, 0.0133]]);
    expect(r.rowNumbers).toEqual([3, 4, 6, 7]);
    expect(r.problems).toEqual([]);
  });

  test("title lines above the header are skipped", () => {
    const r = csv("Bench 3 run, invented\n\nt (min),A\n0,0.81\n3,0.66\n6,0.55\n9,0.46\n");
    expect(r.time.header).toBe("t (min)");
    expect(r.value.header).toBe("A");
    expect(r.points.length).toBe(4);
  });

  test("unparseable rows are listed by number and column with the reason", () => {
    const r = csv("t,c\n0,0.02\n1,0.018\n2,n/a\nabc,0.015\n4,0.014\n5,\n6,0.012\n");
    expect(r.points.length).toBe(4);
    expect(r.problems).toEqual([
      { row: 4, column: "B (c)", message: '"n/a" is not a number' },
      { row: 5, column: "A (t)", message: '"abc" is not a number' },
      { row: 7, column: "B (c)", message: "the value is missing" },
    ]);
  });

  test("a decimal comma inside quotes of a comma file is named as such", () => {
    const r = csv('t,c\n0,0.02\n1,0.018\n2,"0,016"\n3,0.015\n4,0.014\n');
    expect(r.problems[0].message).toMatch(/decimal comma in a comma-separated file/);
  });

  test("columns chosen by header text, 1-based number or letter", () => {
    const table = readCsv(enc("n,t / s,kappa (mS/cm),T (C)\n1,0,2.4,25\n2,30,2.2,25\n3,60,2.0,25\n4,90,1.9,25\n"));
    expect(extractPoints(table, { time: "t / s", value: "kappa (mS/cm)" }).points[1]).toEqual([30, 2.2]);
    expect(extractPoints(table, { time: 2, value: "3" }).points[1]).toEqual([30, 2.2]);
    expect(extractPoints(table, { time: "B", value: "D" }).points[1]).toEqual([30, 25]);
    expect(refusal(() => extractPoints(table, { time: "zeit" }))).toMatch(/No time column "zeit".*"t \/ s"/);
    expect(refusal(() => extractPoints(table, { time: 9 }))).toMatch(/column number 9 does not exist/);
  });

  test("value hints pick the measured column", () => {
    const shape = describeTable(readCsv(enc("t / s,T (C),kappa (mS/cm)\n0,25,2.4\n30,25,2.2\n60,25,2.0\n90,25,1.9\n")))!;
    const g = guessColumns(shape, ["kappa", "conductivity"])!;
    expect(g.value.header).toBe("kappa (mS/cm)");
    expect(g.timeUnit).toBe("s");
  });
});

describe("refusals", () => {
  test("an empty file", () => {
    expect(refusal(() => readCsv(new Uint8Array(0), "run.csv"))).toMatch(/run.csv is empty/);
    expect(refusal(() => readCsv(enc("\r\n\n  \n"), "run.csv"))).toMatch(/only blank lines/);
  });

  test("a PNG and a PDF renamed .csv", () => {
    // PNG signature 89 50 4E 47 0D 0A 1A 0A, PDF "%PDF-" (the formats' specifications, from memory)
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]);
    expect(refusal(() => readCsv(png, "plot.csv"))).toMatch(/plot.csv is a PNG image/);
    expect(refusal(() => readCsv(enc("%PDF-1.7\n%âãÏÓ\n1 0 obj"), "r.csv"))).toMatch(/a PDF document/);
    expect(binaryKind(new Uint8Array([1, 2, 0, 4]))).toBe("a binary file");
  });

  test("no numeric column pair", () => {
    expect(refusal(() => csv("name,comment\nalpha,ok\nbeta,fine\ngamma,good\ndelta,bad\n"))).toMatch(/no pair of numeric columns/);
    expect(refusal(() => csv("t\n0\n1\n2\n3\n4\n"))).toMatch(/no pair of numeric columns/);
  });

  test("fewer than 4 usable rows", () => {
    expect(refusal(() => csv("t,c\n0,0.02\n1,0.018\n2,0.016\n"))).toMatch(/only 3 usable row\(s\).*at least 4/);
    expect(refusal(() => csv("t,c\n0,0.02\n1,0.018\n2,x\n3,y\n4,0.01\n5,z\n"))).toMatch(/only 3 usable.*row 4, column B \(c\): "x" is not a number/);
  });
});

describe("helpers", () => {
  test("numbers with either decimal mark, true minus, units in headers", () => {
    expect(cellNumber("−1,5", true)).toBe(-1.5);
    expect(cellNumber("1,5", false)).toBeNull();
    expect(cellNumber(" 2.5e-3 ", false)).toBe(0.0025);
    expect(splitHeader("t / min")).toEqual({ name: "t", unit: "min" });
    expect(splitHeader("kappa (mS/cm)")).toEqual({ name: "kappa", unit: "mS/cm" });
    expect(splitHeader("c [mmol/L]")).toEqual({ name: "c", unit: "mmol/L" });
    expect(splitHeader("time, s")).toEqual({ name: "time", unit: "s" });
    expect(splitHeader("t/min")).toEqual({ name: "t", unit: "min" });
    expect(splitHeader("mS/cm")).toEqual({ name: "mS/cm", unit: "" });
    expect(timeUnitFrom("minutes")).toBe("min");
    expect(timeUnitFrom("mS/cm")).toBeNull();
    for (const u of ["mol/L", "M", "mol L-1", "mol dm-3", "mol/dm3", "mol·L⁻¹"]) expect(concentrationUnitFrom(u)).toBe("mol/L");
    for (const u of ["mmol/L", "mM", "mmol L-1", "mmol dm-3"]) expect(concentrationUnitFrom(u)).toBe("mmol/L");
    expect(concentrationUnitFrom("mS/cm")).toBeNull();
    expect(columnLetter(0)).toBe("A");
    expect(columnLetter(27)).toBe("AB");
  });
});

async function workbook(build: (wb: ExcelJS.Workbook) => void): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  build(wb);
  return new Uint8Array(await wb.xlsx.writeBuffer());
}

describe(".xlsx", () => {
  test("first sheet with numbers, formulas by their cached values", async () => {
    const bytes = await workbook((wb) => {
      wb.addWorksheet("Notes").addRow(["Invented demo run; readings on the next sheet"]);
      const ws = wb.addWorksheet("Readings");
      ws.addRow(["t / min", "CA (mmol/L)", "ln(CA0/CA)"]);
      const values = [20, 16.4, 13.5, 11.1, 9.1];
      values.forEach((c, i) => ws.addRow([i * 5, c, { formula: `LN(21/B${i + 2})`, result: Math.log(21 / c) }]));
    });
    const table = await readReadingsFile(bytes, "run.xlsx");
    expect(table.sheetName).toBe("Readings");
    expect(table.notes.join(" ")).toMatch(/"Notes" held no pair/);
    const r = extractPoints(table, { value: "ln(CA0/CA)" });
    expect(r.points[1][0]).toBe(5);
    expect(r.points[1][1]).toBeCloseTo(Math.log(21 / 16.4), 12);
    expect(r.rowNumbers[0]).toBe(2);
  });

  test("times of day become seconds elapsed", async () => {
    const bytes = await workbook((wb) => {
      const ws = wb.addWorksheet("Run");
      ws.addRow(["clock", "kappa (mS/cm)"]);
      // Spreadsheets store a time of day as a fraction of a day after 1899-12-30 (from memory).
      const at = (h: number, m: number, s: number) => new Date(Date.UTC(1899, 11, 30, h, m, s));
      [[at(9, 15, 0), 2.4], [at(9, 16, 30), 2.2], [at(9, 18, 0), 2.05], [at(9, 20, 0), 1.9]].forEach((r) => ws.addRow(r));
      ws.getColumn(1).numFmt = "hh:mm:ss";
    });
    const table = await readReadingsFile(bytes, "run.xlsx");
    const r = extractPoints(table);
    expect(r.points.map((p) => p[0])).toEqual([0, 90, 180, 300]);
    expect(r.time.unit).toBe("s");
    expect(table.notes.join(" ")).toMatch(/Column A \(clock\) holds clock times \(hh:mm:ss\), read as seconds since the first reading \(row 2, 09:15:00\)/);
  });

  test("an .xlsx renamed .csv still reads; a workbook without numbers is refused", async () => {
    const good = await workbook((wb) => {
      const ws = wb.addWorksheet("S");
      [[0, 1], [1, 0.8], [2, 0.6], [3, 0.5]].forEach((r) => ws.addRow(r));
    });
    expect(extractPoints(await readReadingsFile(good, "run.csv")).points.length).toBe(4);
    const bad = await workbook((wb) => wb.addWorksheet("S").addRow(["nothing", "here"]));
    expect(await refusalAsync(readReadingsFile(bad, "empty.xlsx"))).toMatch(/No sheet of empty.xlsx has two columns of numbers/);
    expect(await refusalAsync(readReadingsFile(new Uint8Array([0x50, 0x4b, 3, 4, 9, 9, 9]), "broken.xlsx"))).toMatch(/could not be opened/);
  });
});

// Common practice, no source: spreadsheets set to a decimal-comma locale write "0,5" for one half;
// exported as comma-separated text, each number is split in two. Readings computed here from the
// first-order law c = c0·exp(-k t) (textbook integrated rate law), c0 = 20 mmol/L, k = 0.05 /min.
describe("a decimal comma in a comma-separated file", () => {
  const law = (t: number) => 20 * Math.exp(-0.05 * t);
  const comma = (x: number) => x.toFixed(2).replace(".", ",");
  const rows = [0, 2.5, 5, 7.5, 10, 12.5].map((t) => `${comma(t)},${comma(law(t))}`);
  const file = `t / min,CA (mmol/L)\n${rows.join("\n")}\n`;

  test("is refused with the cause, the row and the fix, in the data-set check's words", async () => {
    const m = refusal(() => readCsv(enc(file), "run.csv"));
    expect(m).toMatch(/decimal comma while commas also separate the columns \(row 2: "0,00,20,00"\)/);
    expect(m).toMatch(/semicolons/);
    expect(await refusalAsync(readReadingsFile(enc(file), "run.csv"))).toBe(m);
  });

  test("the same readings with semicolons are read as meant", () => {
    const r = csv(`t / min;CA (mmol/L)\n${[0, 2.5, 5, 7.5, 10, 12.5].map((t) => `${comma(t)};${comma(law(t))}`).join("\n")}\n`);
    expect(r.points[1][0]).toBeCloseTo(2.5, 10);
    expect(r.points[1][1]).toBeCloseTo(law(2.5), 2);
  });

  test("an extra column of whole numbers with points elsewhere is not taken for split decimals", () => {
    const r = csv("t,c,T\n0,0.02,25\n1,0.018,25\n2,0.016,25\n3,0.015,25\n");
    expect(r.points).toEqual([[0, 0.02], [1, 0.018], [2, 0.016], [3, 0.015]]);
  });
});

describe("times written with colons (the numbers are the ones written in the file)", () => {
  test("hh:mm under a header that names a clock: hours and minutes, from the first reading", () => {
    const r = csv("clock,CA (mmol/L)\n09:58,20\n10:00,18\n10:04,16\n10:10,14\n");
    expect(r.points.map((x) => x[0])).toEqual([0, 120, 360, 720]);
    expect(r.time.unit).toBe("s");
  });
  test("a units row that says hh:mm:ss over clock times", () => {
    const r = csv("time,CA\nhh:mm:ss,mmol/L\n08:00:00,20\n08:00:30,19\n08:01:00,18\n08:01:30,17\n");
    expect(r.points.map((x) => x[0])).toEqual([0, 30, 60, 90]);
    expect(r.value.unit).toBe("mmol/L");
  });
  test("a date and time per reading: counted from the first", () => {
    const r = csv("when;A\n2026-12-04 23:59:30;1,0\n2026-12-05 00:00:30;0,9\n2026-12-05 00:01:30;0,8\n2026-12-05 00:02:30;0,7\n");
    expect(r.points.map((x) => x[0])).toEqual([0, 60, 120, 180]);
  });
  test("a column with a few colon times among numbers is left alone", () => {
    const r = csv("t,c,note\n0,1,ok\n1,0.9,10:00\n2,0.8,\n3,0.7,\n");
    expect(r.points).toEqual([[0, 1], [1, 0.9], [2, 0.8], [3, 0.7]]);
  });
  test("start times", () => {
    expect([parseStart("14:02"), parseStart("14:02:30"), parseStart("25:00"), parseStart("2pm")]).toEqual([50520, 50550, null, null]);
  });
});
