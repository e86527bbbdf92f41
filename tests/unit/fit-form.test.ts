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
