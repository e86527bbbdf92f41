import { describe, expect, test } from "vitest";
import { linearRegression } from "simple-statistics";
import { classResults, type ClassBenchInput } from "./class-results";

// Invented reference (A + B, L/(mol s)), as in the test fixtures.
const REF = { kRef: 0.11, TrefC: 25, EaKJ: 50 };
const R = 8.314462618; // J/(mol K), CODATA 2018 (exact in the 2019 SI)

function bench(i: number, over: Partial<ClassBenchInput> = {}): ClassBenchInput {
  return { benchId: i, bench: String(i), group: `G${i}`, temperatureC: 20 + 5 * i, submissionId: 100 + i, status: "marked", k: 0.1 * (1 + 0.3 * i), kStdErr: 0.002 * (1 + i), kCI95: null, ...over };
}

describe("class results: which benches count", () => {
  test("each bench's state, note and counts", () => {
    const rows = [bench(1), bench(2, { status: null, k: null }), bench(3, { status: "queued", k: null }), bench(4, { status: "refused", k: null }), bench(5, { k: -1 }), bench(6)];
    const r = classResults(rows, REF, [{ benchId: 6, reason: "thermostat failed (invented)", by: "Instructor", at: "2026-01-01T10:00:00.000Z" }]);
    expect(r.benches.map((b) => b.state)).toEqual(["in-fit", "no-upload", "not-marked", "not-marked", "no-k", "excluded"]);
    expect(r.benches[2].note).toMatch(/being marked/);
    expect(r.benches[3].note).toMatch(/refused/);
    expect(r.benches[5].exclusion?.reason).toBe("thermostat failed (invented)");
    expect(r.counts).toEqual({ inFit: 1, excluded: 1, waiting: 4 });
    expect(r.plot.inFit).toHaveLength(1);
    expect(r.plot.excluded).toHaveLength(1);
  });

  test("fewer than 3 benches in the fit: no fit, said plainly, exclusions counted", () => {
    const r = classResults([bench(1), bench(2), bench(3)], REF, [{ benchId: 3, reason: "spilt", by: null, at: "2026-01-01T10:00:00.000Z" }]);
    expect(r.fit).toBeNull();
    expect(r.noFit).toBe("No pooled fit yet: only 2 benches have a marked k to use (1 left out of the fit), and the fit needs at least 3.");
    expect(r.plot.fitted).toEqual([]);
    // the reference line is still drawn across the benches shown
    expect(r.plot.reference).toHaveLength(2);
  });

  test("every bench at one temperature: no slope, no fit", () => {
    const r = classResults([bench(1, { temperatureC: 30 }), bench(2, { temperatureC: 30 }), bench(3, { temperatureC: 30 })], REF, []);
    expect(r.fit).toBeNull();
    expect(r.noFit).toMatch(/same temperature/);
  });

  test("deviation is signed, in percent of the reference k at the bench's temperature", () => {
    // two-point Arrhenius form k2 = k1 exp(-Ea/R (1/T2 - 1/T1)) (textbook, from memory)
    const kRef35 = REF.kRef * Math.exp((-REF.EaKJ * 1000 / R) * (1 / 308.15 - 1 / 298.15));
    const r = classResults([bench(1, { temperatureC: 35, k: kRef35 * 1.1 })], REF, []);
    expect(r.benches[0].kRefAtT).toBeCloseTo(kRef35, 12);
    expect(r.benches[0].deviationPct).toBeCloseTo(10, 9);
  });
});

describe("class results: the reference and the pooled fit", () => {
  test("reference A = kRef exp(Ea/(R Tref)) reproduces kRef at Tref and the reference line passes through k ref at each bench", () => {
    const r = classResults([bench(1), bench(4)], REF, []);
    expect(r.reference.A * Math.exp(-REF.EaKJ * 1000 / (R * 298.15))).toBeCloseTo(REF.kRef, 12);
    for (const [x, y] of r.plot.reference) {
      const T = 1000 / x;
      const kRefAtT = REF.kRef * Math.exp((-REF.EaKJ * 1000 / R) * (1 / T - 1 / 298.15));
      expect(y).toBeCloseTo(Math.log(kRefAtT), 10);
    }
  });

  test("equal weights (no k uncertainties): same line as simple-statistics' linearRegression on (1/T, ln k)", () => {
    const rows = [1, 2, 3, 4, 5].map((i) => bench(i, { kStdErr: null, k: 0.05 * Math.exp(0.35 * i) * (1 + 0.02 * Math.sin(i)) }));
    const r = classResults(rows, REF, []);
    expect(r.fit?.weighting).toBe("equal");
    // independent regression: simple-statistics 7 linearRegression (ordinary least squares)
    const line = linearRegression(rows.map((b) => [1 / (b.temperatureC + 273.15), Math.log(b.k!)]));
    expect(r.fit!.EaKJ).toBeCloseTo((-line.m * R) / 1000, 8);
    expect(r.fit!.lnA).toBeCloseTo(line.b, 8);
    expect(r.fit!.n).toBe(5);
    expect(r.fit!.dof).toBe(3);
  });

  test("weights from each bench's k standard error: weighted least squares worked by hand", () => {
    const rows = [1, 2, 3, 4].map((i) => bench(i, { k: 0.04 * Math.exp(0.4 * i) * (1 + 0.03 * Math.cos(3 * i)), kStdErr: 0.001 * i * i }));
    const excludedRow = bench(5, { k: 5, kStdErr: 0.01 });
    const r = classResults([...rows, excludedRow], REF, [{ benchId: 5, reason: "a unit slip (invented)", by: "I", at: "2026-01-01T00:00:00.000Z" }]);
    // Weighted least squares, w = 1/var(ln k) = (k/SE)^2 (first-order error propagation; Taylor,
    // An Introduction to Error Analysis, ch. 8, from memory): slope = Sxy/Sxx about weighted means.
    const x = rows.map((b) => 1 / (b.temperatureC + 273.15));
    const y = rows.map((b) => Math.log(b.k!));
    const w = rows.map((b) => (b.k! / b.kStdErr!) ** 2);
    const sw = w.reduce((a, v) => a + v, 0);
    const xm = w.reduce((a, v, i) => a + v * x[i], 0) / sw;
    const ym = w.reduce((a, v, i) => a + v * y[i], 0) / sw;
    const sxx = w.reduce((a, v, i) => a + v * (x[i] - xm) ** 2, 0);
    const sxy = w.reduce((a, v, i) => a + v * (x[i] - xm) * (y[i] - ym), 0);
    const slope = sxy / sxx;
    expect(r.fit!.weighting).toBe("k-uncertainty");
    expect(r.fit!.n).toBe(4); // the excluded bench is not in it
    expect(r.fit!.EaKJ).toBeCloseTo((-slope * R) / 1000, 8);
    expect(r.fit!.lnA).toBeCloseTo(ym - slope * xm, 8);
    expect(r.fit!.EaKJCI95[0]).toBeLessThan(r.fit!.EaKJ);
    expect(r.fit!.EaKJCI95[1]).toBeGreaterThan(r.fit!.EaKJ);
    expect(r.fit!.ACI95[0]).toBeLessThan(r.fit!.A);
    // the excluded bench is plotted as such, and the fitted line spans every plotted bench
    expect(r.plot.excluded).toEqual([[1000 / (45 + 273.15), Math.log(5)]]);
    expect(r.plot.fitted[0][0]).toBeCloseTo(1000 / (45 + 273.15), 12);
    expect(r.benches[0].kFitted).toBeCloseTo(Math.exp(ym - slope * xm + slope * x[0]), 10);
  });
});
