// What the data-set check shows for an engine result, rendered to HTML as the server does.
import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, test } from "vitest";
import { FitReport } from "~/components/fit-report";
import { runFit, validateFitRequest, type FitResult } from "~/lib/kinetics";
import { buildFitRequest } from "~/lib/fit-form";
import { inventedExample } from "~/lib/example-run";

function fit(request: unknown): FitResult {
  const checked = validateFitRequest(request);
  if (!checked.ok) throw new Error(JSON.stringify(checked.errors));
  return runFit(checked.request);
}

function render(result: FitResult, points: Array<[number, number]>) {
  return renderToStaticMarkup(createElement(FitReport, { result, kind: "concentrationA", points, lines: points.map((_, i) => i + 1) }));
}

const text = (html: string) => html.replace(/<[^>]+>/g, " ").replace(/\s+/g, " ");

describe("fit report", () => {
  test("with no usable readings there is no result: no k, no tolerance verdict, no best law", () => {
    // Every reading at zero concentration: none lies on the straight line ln(CA0/CA).
    const points: Array<[number, number]> = [[0, 0], [5, 0], [10, 0], [15, 0], [20, 0]];
    const result = fit({
      reaction: { a: 1, b: 0, orderA: 1, orderB: 0 }, feed: { CA0: 0.02, CB0: 0 }, units: { time: "min", concentration: "mol/L" },
      measurement: { kind: "concentrationA" }, points, reference: { k: 0.001 },
    });
    expect(result.n).toBe(0);
    const out = text(render(result, points));
    expect(out).toContain("No result");
    expect(out).not.toMatch(/tolerance|\(best\)|L\/\(mol·min\)|= 0 /);
  });

  test("the invented example prints one number style: true minus, ×10ⁿ, no e-notation or asterisks", () => {
    const built = buildFitRequest(inventedExample());
    expect(built.problems).toEqual([]);
    const result = fit(built.request);
    const out = text(render(result, built.request.points as Array<[number, number]>));
    expect(out).toMatch(/k, (weighted straight-line|curve) fit \(used for marking\)/);
    expect(out).not.toMatch(/\d[eE][+-]?\d|10\^|\*|★/);
    expect(out).not.toMatch(/(^|[\s(])-\d/);
    for (const [, lo, hi] of out.matchAll(/CI (\S+) to (\S+)\)/g)) expect(lo).not.toBe(hi);
  });

  test("a flag comparing two k values that agree to three figures shows them with the digits that tell them apart", () => {
    const built = buildFitRequest(inventedExample());
    const result = fit(built.request);
    const k = 0.00200049;
    const other = 0.00200351;
    const faked: FitResult = {
      ...result,
      weightedLine: { ...result.weightedLine, k },
      nonlinear: { ...result.nonlinear, k: other },
      flags: [{ code: "fits-disagree", rows: [], prefer: "curve", message: `The weighted straight line (k = ${k.toPrecision(3)}) and the curve fit to the readings (k = ${other.toPrecision(3)}) differ by more than their uncertainties allow. Trust the curve-fit k (${other.toPrecision(3)}): reasons.` }],
    };
    const out = text(render(faked, built.request.points as Array<[number, number]>));
    expect(out).toContain("(k = 0.002000) and the curve fit to the readings (k = 0.002004)");
  });

  test("the residual plot's axis label is short enough to fit its height", () => {
    const built = buildFitRequest(inventedExample());
    const result = fit(built.request);
    const html = render(result, built.request.points as Array<[number, number]>);
    const label = /rotate\(-90\)"[^>]*>([^<]+)<\/text>/g;
    const heights = [...html.matchAll(/<svg[^>]*height="(\d+)"/g)].map((m) => Number(m[1]));
    const labels = [...html.matchAll(label)].map((m) => m[1]);
    expect(labels).toHaveLength(2);
    // 13 px bold text is about 0.6 em a character (common practice, no source); bottom margin 46, top 12.
    labels.forEach((l, i) => expect(l.length * 13 * 0.6).toBeLessThan(heights[i] - 58));
  });
});
