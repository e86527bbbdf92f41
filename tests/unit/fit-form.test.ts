import { describe, expect, test } from "vitest";
import { buildFitRequest, parsePoints, problemFromEnginePath, type FitFormValues } from "~/lib/fit-form";
import { validateFitRequest } from "~/lib/kinetics";

const base: FitFormValues = {
  a: "1", b: "2", law: "AB", CA0: "0.02", CB0: "0.02", concentrationUnit: "mol/L", timeUnit: "min",
  kind: "concentrationA", S0: "", Sinf: "", species: "A", epsilon: "", pathCm: "", baseline: "",
  temperatureC: "", refK: "", TrefC: "", EaKJ: "", tolerancePct: "", data: "",
};

describe("pasted data", () => {
  test("header, tabs and blank lines are accepted; each point keeps its pasted line number", () => {
    const p = parsePoints("time\tC_A\n0\t0.02\n\n5\t0.0171\n10\t0.015\n");
    expect(p.problems).toEqual([]);
    expect(p.points).toEqual([[0, 0.02], [5, 0.0171], [10, 0.015]]);
    expect(p.lines).toEqual([2, 4, 5]);
  });

  test("a bad cell is named by line and column", () => {
    const p = parsePoints("0;0.02\n5;0,0171\n10\n");
    expect(p.problems.map((x) => x.message)).toEqual([
      'Line 2, column 2 (value): "0,0171" is not a number (use a point as the decimal mark).',
      'Line 3: expected two columns (time, value), found one: "10".',
    ]);
  });

  test("nothing pasted asks for data", () => {
    expect(parsePoints("  ").problems[0]).toEqual({ field: "data", message: "Paste at least 3 rows of time and measured value." });
  });
});

describe("form to engine request", () => {
  test("a complete form makes a request the engine accepts", () => {
    const { request, problems } = buildFitRequest({ ...base, data: "0,0.02\n5,0.0171\n10,0.015", temperatureC: "30", refK: "0.11", TrefC: "25", EaKJ: "48", tolerancePct: "25" });
    expect(problems).toEqual([]);
    const checked = validateFitRequest(request);
    expect(checked.ok).toBe(true);
  });

  test("missing and non-numeric fields come back beside their fields", () => {
    const { problems } = buildFitRequest({ ...base, CA0: "", b: "two", kind: "signal", data: "0,1\n1,2\n2,3" });
    expect(problems).toEqual(
      expect.arrayContaining([
        { field: "CA0", message: "Enter the initial concentration of A." },
        { field: "b", message: '"two" is not a number.' },
        { field: "S0", message: "Enter the signal at the start." },
      ]),
    );
  });

  test("engine error paths land on the field, data rows on their pasted line", () => {
    expect(problemFromEnginePath("feed.CA0", "must be greater than zero", [])).toEqual({ field: "CA0", message: "Must be greater than zero" });
    expect(problemFromEnginePath("points[1][1]", "a concentration cannot be negative", [2, 4, 5])).toEqual({
      field: "data",
      message: "Line 4, column 2 (value): a concentration cannot be negative",
    });
  });
});

describe("separator and decimal mark, found together", () => {
  test("semicolons with decimal commas are read, and the note says how", () => {
    const p = parsePoints("t;CA\n0;0,0200\n5;0,0171\n10;0,0150\n15;0,0132");
    expect(p.problems).toEqual([]);
    expect(p.points).toEqual([[0, 0.02], [5, 0.0171], [10, 0.015], [15, 0.0132]]);
    expect(p.note).toBe('Read 4 readings: columns separated by semicolons, decimal comma, line 1 taken as a header; column 1 ("t") as the time and column 2 ("CA") as the value.');
  });

  test("tabs with decimal commas (a spreadsheet paste in a decimal-comma locale)", () => {
    const p = parsePoints("0\t0,02\n5\t0,0171\n10\t0,015");
    expect(p.problems).toEqual([]);
    expect(p.points[1]).toEqual([5, 0.0171]);
  });

  test("decimal commas in comma-separated text are one whole-paste message, not a nonsense fit", () => {
    const p = parsePoints("0,2,107\n5,1,953\n10,1,841\n15,1,702\n20,1,6");
    expect(p.points).toEqual([]);
    expect(p.problems).toHaveLength(1);
    expect(p.problems[0].message).toMatch(/decimal comma while commas also separate the columns \(line 1: "0,2,107"\)/);
    const withHeader = parsePoints("time,CA\n0,2,107\n5,1,953\n10,1,841");
    expect(withHeader.problems).toHaveLength(1);
  });

  test("extra columns are named as not used", () => {
    const p = parsePoints("time,CA,T\n0,0.02,25.1\n5,0.0171,25.0\n10,0.015,25.2");
    expect(p.problems).toEqual([]);
    expect(p.note).toContain('column 1 ("time") as the time and column 2 ("CA") as the value; column 3 ("T") not used.');
  });

  test("space-separated columns, and units in cells when they match the form", () => {
    const spaced = parsePoints("0   0.020\n5   0.0171\n10  0.0150");
    expect(spaced.problems).toEqual([]);
    expect(spaced.note).toContain("separated by spaces");
    const withUnits = parsePoints("0 min;0.020 mol/L\n5 min;0.0171 mol/L\n10 min;0.0150 mol/L", { time: "min", concentration: "mol/L", kind: "concentrationA" });
    expect(withUnits.problems).toEqual([]);
    expect(withUnits.points).toHaveLength(3);
    const wrongUnit = parsePoints("0 s;0.020\n5 s;0.0171\n10 s;0.0150", { time: "min" });
    expect(wrongUnit.problems[0].message).toBe('Line 1, column 1 (time): "0 s" is in s, but the form says the data\'s time unit is min.');
  });

  test("the same problem on many lines is one message for the whole paste", () => {
    const rows = ["t,v", ...Array.from({ length: 12 }, (_, i) => `${i},n/a`)].join("\n");
    const p = parsePoints(`${rows}\n13,0.5\n14,0.4`);
    expect(p.problems).toHaveLength(1);
    expect(p.problems[0].message).toBe('Column 2 (value) is not a number on 12 lines (2, 3, 4, 5, 6, …), for example "n/a".');
  });
});

describe("messages use the form's labels", () => {
  test("no internal field names in engine messages", () => {
    const m = problemFromEnginePath("temperatureC", "is required to carry the reference k to the run temperature with EaKJ", []);
    expect(m).toEqual({ field: "temperatureC", message: "Is required to carry the reference k to the run temperature with the activation energy" });
    const t = problemFromEnginePath("points[0][0]", "a time of 1e9 min is more than 100000000 s (about three years): check the time column and units.time", [2]);
    expect(t.message).not.toMatch(/units\.time|1e9/);
    expect(t.message).toContain("the time unit of the data");
  });
});
