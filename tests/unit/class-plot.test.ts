// The class Arrhenius plot is scaled to the benches in the fit: a bench left out of the fit (here a
// mmol/L-as-mol/L slip, its k 1000 times too small) no longer flattens the other 23 into a line; it
// is drawn on the frame with an arrow pointing its way, and its value is in its tooltip.
// Benches' k come from the Arrhenius equation k = kRef exp(-Ea/R (1/T - 1/Tref)) (any physical
// chemistry textbook, from memory) on an invented reference (Ea 48 kJ/mol, kRef 0.11 L/(mol s) at
// 25 °C), with a seeded scatter of a few percent.
import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, test } from "vitest";
import { XYPlot } from "~/components/xy-plot";
import { classResults, type ClassBenchInput } from "~/lib/gradebook/class-results";
import { span, toEdge } from "~/lib/plots/edge";

const R = 8.314462618; // J/(mol K), CODATA 2018
const REFERENCE = { kRef: 0.11, TrefC: 25, EaKJ: 48 };

function invented24(): ClassBenchInput[] {
  let seed = 7;
  const noise = () => {
    seed = (seed * 16807) % 2147483647;
    return (seed / 2147483647 - 0.5) * 0.06; // ±3 %
  };
  return Array.from({ length: 24 }, (_, i) => {
    const temperatureC = 15 + (i % 8) * 3.5; // 15 … 39.5 °C
    const T = temperatureC + 273.15;
    const k = REFERENCE.kRef * Math.exp((-REFERENCE.EaKJ * 1000 / R) * (1 / T - 1 / (REFERENCE.TrefC + 273.15))) * (1 + noise());
    // bench 24: readings in mmol/L taken as mol/L, so k (second order) is 1000 times too small
    const slip = i === 23 ? 1e-3 : 1;
    return { benchId: i + 1, bench: String(i + 1), group: `Group ${i + 1} (invented)`, temperatureC, submissionId: i + 1, status: "marked", k: k * slip, kStdErr: null, kCI95: null };
  });
}

const HEIGHT = 300;
const TOP = 12; // XYPlot's frame: margins 12 px top, 46 px bottom
const BOTTOM = HEIGHT - 46;

function render(fitToPoints: boolean) {
  const results = classResults(invented24(), REFERENCE, [{ benchId: 24, reason: "unit slip (invented)", by: "Instructor", at: "2026-01-01T00:00:00Z" }]);
  const left = results.benches.filter((b) => b.state === "excluded");
  const svg = renderToStaticMarkup(createElement(XYPlot, {
    title: "Class Arrhenius plot",
    xLabel: "1/T",
    yLabel: "ln k",
    height: HEIGHT,
    points: results.plot.inFit,
    crosses: results.plot.excluded,
    curve: results.plot.fitted,
    dashed: results.plot.reference,
    fitToPoints,
    crossLabels: left.map((b) => `Bench ${b.bench}, left out: ln k = ${b.lnK!.toFixed(2)}`),
  }));
  const cys = [...svg.matchAll(/<circle [^>]*cy="([-\d.]+)"/g)].map((m) => Number(m[1]));
  return { svg, cys, results, left };
}

describe("class Arrhenius plot axes", () => {
  test("the 23 benches in the fit use most of the plot's height; without fitToPoints the left-out bench squeezes them", () => {
    const scaled = render(true);
    const squeezed = render(false);
    expect(scaled.results.counts).toEqual({ inFit: 23, excluded: 1, waiting: 0 });
    expect(scaled.cys).toHaveLength(23);
    const spread = (cys: number[]) => (Math.max(...cys) - Math.min(...cys)) / (BOTTOM - TOP);
    // ln k over 15-39.5 °C at 48 kJ/mol spans about 1.6; ln 1000 = 6.9 more for the slip
    console.log(`in-fit spread of the plot height: ${(100 * spread(scaled.cys)).toFixed(0)} % scaled to the fit, ${(100 * spread(squeezed.cys)).toFixed(0)} % scaled to every bench`);
    expect(spread(squeezed.cys)).toBeLessThan(0.3);
    expect(spread(scaled.cys)).toBeGreaterThan(0.7);
    // every bench in the fit lies inside the frame
    for (const cy of scaled.cys) {
      expect(cy).toBeGreaterThanOrEqual(TOP);
      expect(cy).toBeLessThanOrEqual(BOTTOM);
    }
  });

  test("the left-out bench is an arrow on the lower edge pointing down, its ln k in its tooltip; the reference line is clipped to the frame", () => {
    const { svg, left } = render(true);
    const edge = svg.match(/<path d="M[-\d.]+,([-\d.]+)L[-\d.]+,[-\d.]+L[-\d.]+,([-\d.]+)Z" fill="#a3261b" data-series="edge" data-side="(\w+)"><title>([^<]*)<\/title>/);
    expect(edge).not.toBeNull();
    expect(edge![3]).toBe("below");
    expect(Number(edge![2])).toBeCloseTo(BOTTOM, 1); // the arrow's tip is on the x axis line
    expect(edge![4]).toContain(`Bench 24, left out: ln k = ${left[0].lnK!.toFixed(2)}`);
    expect(edge![4]).toContain("outside the axes, below");
    expect(svg).not.toContain('data-series="crosses"');
    expect(svg).toMatch(/data-series="dashed" clip-path="url\(#xy-frame-[\w-]+\)"/);
    expect(svg).toContain("a filled arrow on the frame is one of them lying beyond the axes");
  });

  test("a left-out bench inside the benches' range stays a cross where it is", () => {
    const benches = invented24().map((b) => (b.benchId === 24 ? { ...b, k: b.k! * 1000 } : b));
    const results = classResults(benches, REFERENCE, [{ benchId: 24, reason: "checked (invented)", by: null, at: "2026-01-01T00:00:00Z" }]);
    const svg = renderToStaticMarkup(createElement(XYPlot, { title: "t", xLabel: "x", yLabel: "y", points: results.plot.inFit, crosses: results.plot.excluded, curve: results.plot.fitted, fitToPoints: true }));
    expect(svg).toContain('data-series="crosses"');
    expect(svg).not.toContain('data-series="edge"');
  });

  test("span and toEdge", () => {
    expect(span([1, 3])).toEqual([0.9, 3.1]);
    expect(span([])).toBeNull();
    expect(span([2, 2])).toEqual([expect.closeTo(1.89, 12), expect.closeTo(2.11, 12)]);
    expect(toEdge([5, 100], [0, 10], [0, 1])).toEqual({ at: [5, 1], side: "above" });
    expect(toEdge([-3, 0.5], [0, 10], [0, 1])).toEqual({ at: [0, 0.5], side: "left" });
    expect(toEdge([5, 0.5], [0, 10], [0, 1])).toEqual({ at: [5, 0.5], side: null });
  });
});
