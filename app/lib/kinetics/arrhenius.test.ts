import { describe, expect, it } from "vitest";
import { MultivariateLinearRegression } from "ml-regression";
import nist from "../../../tests/fixtures/nist-strd-linear.json";
import { GAS_CONSTANT, fitArrhenius, fitWeightedLine, rateConstantAt, runArrhenius } from "./arrhenius.ts";
import { normalSource } from "./synthetic.ts";

// Ethyl acetate + hydroxide: k(25 C) = 0.1120 L/(mol s), Ea = 11.56 kcal/mol = 48.37 kJ/mol
// (Tsujikawa and Inoue, Bull. Chem. Soc. Jpn. 39 (1966) 1837, abstract; see
// shared/reference/kinetics-literature.md). A about 3.33e7 L/(mol s) is derived from them there.
const K25 = 0.112;
const EA = 48.37e3;
const T25 = 298.15;

describe("Arrhenius temperature dependence", () => {
  it("uses R = 8.314462618 J/(mol K) (2019 SI value, N_A k_B)", () => {
    expect(GAS_CONSTANT).toBe(8.314462618);
  });

  it("k at the reference temperature is the reference k; Ea = 0 leaves k unchanged", () => {
    expect(rateConstantAt(K25, T25, EA, T25)).toBe(K25);
    expect(rateConstantAt(K25, T25, 0, 350)).toBe(K25);
  });

  it("the derived pre-exponential factor with the published Ea gives back the published k at 25 C", () => {
    const A = 3.33e7;
    const k = A * Math.exp(-EA / (GAS_CONSTANT * T25));
    expect(Math.abs(k - K25) / K25).toBeLessThan(0.005); // A is quoted to 3 digits
  });

  it("about 50 kJ/mol roughly doubles k for a 10 K rise near room temperature (common practice, no source)", () => {
    const ratio = rateConstantAt(1, T25, 50e3, T25 + 10);
    expect(ratio).toBeGreaterThan(1.8);
    expect(ratio).toBeLessThan(2.1);
  });

  it("the pooled fit of ln k against 1/T recovers Ea and A from exact values", () => {
    const runs = [15, 20, 25, 30, 35].map((c) => ({ temperatureK: c + 273.15, k: rateConstantAt(K25, T25, EA, c + 273.15) }));
    const fit = fitArrhenius(runs);
    expect(fit.Ea / EA).toBeCloseTo(1, 10);
    expect(fit.A * Math.exp(-EA / (GAS_CONSTANT * T25)) / K25).toBeCloseTo(1, 9);
    expect(fit.r2).toBeCloseTo(1, 12);
  });

  it("with seeded noise on ln k (synthetic, known Ea), the intervals are t-based and cover the true values", () => {
    const normal = normalSource(2024);
    const temps = [10, 15, 20, 25, 30, 35, 40].map((c) => c + 273.15);
    const runs = temps.map((T) => ({ temperatureK: T, k: rateConstantAt(K25, T25, EA, T) * Math.exp(0.03 * normal()) }));
    const fit = fitArrhenius(runs);
    // t(0.975, 5) = 2.571 to three decimals (standard t tables, from memory)
    expect((fit.EaCI95[1] - fit.Ea) / fit.EaStdErr).toBeCloseTo(2.571, 3);
    expect(fit.EaCI95[0]).toBeLessThan(EA);
    expect(fit.EaCI95[1]).toBeGreaterThan(EA);
    const trueA = K25 / Math.exp(-EA / (GAS_CONSTANT * T25));
    expect(fit.ACI95[0]).toBeLessThan(trueA);
    expect(fit.ACI95[1]).toBeGreaterThan(trueA);
    expect(fit.ACI95[0]).toBeLessThan(fit.A);
    expect(fit.ACI95[1]).toBeGreaterThan(fit.A);
  });

  it("refuses fewer than 3 runs or a non-positive k", () => {
    expect(() => fitArrhenius([{ temperatureK: 300, k: 1 }, { temperatureK: 310, k: 2 }])).toThrow(/3 runs/);
    expect(() =>
      fitArrhenius([
        { temperatureK: 300, k: 1 },
        { temperatureK: 310, k: 0 },
        { temperatureK: 320, k: 3 },
      ]),
    ).toThrow(/k > 0/);
  });
});

describe("pooled Arrhenius fit weighted by the benches' k uncertainties", () => {
  // seeded synthetic benches around the published values above; k scatter as each SE says
  const normal = normalSource(99);
  const benches = [15, 20, 25, 30, 35, 40].map((c, i) => {
    const T = c + 273.15;
    const se = 0.02 + 0.01 * i; // relative SE of k, larger at the hotter benches (invented)
    const k = rateConstantAt(K25, T25, EA, T) * Math.exp(se * normal());
    return { id: `bench ${i + 1}`, temperatureK: T, k, kStdErr: se * k };
  });

  it("agrees with an independent weighted regression (ml-regression on the sqrt(w)-scaled design)", () => {
    const fit = fitArrhenius(benches);
    // Weighted least squares is ordinary least squares on rows scaled by sqrt(w), through the
    // origin with the two scaled columns (standard result; e.g. Draper and Smith, Applied
    // Regression Analysis, 3rd ed., 9.2; from memory). ml-regression's variance is SSE/(n - p).
    const x = benches.map((b) => {
      const s = b.k / b.kStdErr;
      return [s, s / b.temperatureK];
    });
    const y = benches.map((b) => [(b.k / b.kStdErr) * Math.log(b.k)]);
    const ref = new MultivariateLinearRegression(x, y, { intercept: false, statistics: true });
    const [lnA, slope] = ref.weights.map((w: number[]) => w[0]);
    expect(fit.lnA).toBeCloseTo(lnA, 8);
    expect(fit.Ea / (-GAS_CONSTANT * slope)).toBeCloseTo(1, 10);
    expect(fit.lnAStdErr / ref.stdErrors[0]).toBeCloseTo(1, 8);
    expect(fit.EaStdErr / (GAS_CONSTANT * ref.stdErrors[1])).toBeCloseTo(1, 8);
    expect(fit.weighting).toBe("k-uncertainty");
    expect(fit.benches.map((b) => b.id)).toEqual(benches.map((b) => b.id));
    expect(fit.benches[0].lnResidual).toBeCloseTo(Math.log(benches[0].k) - (fit.lnA - fit.Ea / (GAS_CONSTANT * benches[0].temperatureK)), 12);
  });

  it("with equal weights reproduces NIST StRD Norris (the weighted line is the ordinary one)", () => {
    const d = nist.datasets.Norris;
    const line = fitWeightedLine(d.x, d.y, d.x.map(() => 1));
    expect(line.slope / d.certified.B1.estimate_num).toBeCloseTo(1, 10);
    expect(line.slopeStdErr / d.certified.B1.sd_num).toBeCloseTo(1, 9);
    expect(line.interceptStdErr / d.certified.B0.sd_num).toBeCloseTo(1, 9);
  });

  it("runArrhenius reports Ea in kJ/mol with its interval, covering the true value", () => {
    const r = runArrhenius(benches.map((b) => ({ id: b.id, temperatureC: b.temperatureK - 273.15, k: b.k, kStdErr: b.kStdErr })));
    expect(r.EaKJ).toBeCloseTo(r.Ea / 1000, 12);
    expect(r.EaKJCI95[0]).toBeLessThan(EA / 1000);
    expect(r.EaKJCI95[1]).toBeGreaterThan(EA / 1000);
    expect(r.ACI95[0]).toBeLessThan(r.A);
  });
});
