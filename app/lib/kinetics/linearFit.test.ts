import { describe, expect, it } from "vitest";
import nist from "../../../tests/fixtures/nist-strd-linear.json";
import { fitLine } from "./linearFit.ts";

// Source: NIST StRD linear least squares regression, datasets Norris, NoInt1, NoInt2
// (certified values), copied into tests/fixtures/nist-strd-linear.json.

/** Number of correct significant digits (log relative error), as NIST uses to grade software. */
function digits(estimate: number, certified: number): number {
  if (estimate === certified) return 16;
  return -Math.log10(Math.abs(estimate - certified) / Math.abs(certified));
}

const MIN_DIGITS = 9;

describe("straight-line least squares against NIST StRD certified values", () => {
  it("Norris (with intercept): slope, intercept, their standard deviations, residual SD and R^2", () => {
    const d = nist.datasets.Norris;
    const fit = fitLine(d.x, d.y);
    const c = d.certified;
    expect(digits(fit.slope, c.B1.estimate_num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(digits(fit.intercept, c.B0.estimate_num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(digits(fit.slopeStdErr, c.B1.sd_num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(digits(fit.interceptStdErr, c.B0.sd_num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(digits(fit.residualStdDev, c.residual_sd.num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(digits(fit.r2, c.r_squared.num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(digits(fit.sse, c.anova.residual.ss.num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(fit.dof).toBe(34);
  });

  for (const name of ["NoInt1", "NoInt2"] as const) {
    it(`${name} (through the origin): slope, its standard deviation, residual SD and uncentred R^2`, () => {
      const d = nist.datasets[name];
      const fit = fitLine(d.x, d.y, true);
      const c = d.certified;
      expect(fit.intercept).toBe(0);
      expect(digits(fit.slope, c.B1.estimate_num)).toBeGreaterThanOrEqual(MIN_DIGITS);
      expect(digits(fit.slopeStdErr, c.B1.sd_num)).toBeGreaterThanOrEqual(MIN_DIGITS);
      expect(digits(fit.residualStdDev, c.residual_sd.num)).toBeGreaterThanOrEqual(MIN_DIGITS);
      expect(digits(fit.r2, c.r_squared.num)).toBeGreaterThanOrEqual(MIN_DIGITS);
      expect(digits(fit.sse, c.anova.residual.ss.num)).toBeGreaterThanOrEqual(MIN_DIGITS);
      expect(fit.dof).toBe(d.n - 1);
    });
  }

  it("keeps the Norris digits when x carries a large offset (centred sums)", () => {
    // Shifting x by a constant changes only the intercept (common practice, no source):
    // a logger's clock time instead of time since mixing must not cost precision.
    const d = nist.datasets.Norris;
    const shift = 1e6;
    const fit = fitLine(d.x.map((x) => x + shift), d.y);
    const c = d.certified;
    expect(digits(fit.slope, c.B1.estimate_num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(digits(fit.slopeStdErr, c.B1.sd_num)).toBeGreaterThanOrEqual(MIN_DIGITS);
    expect(digits(fit.intercept + fit.slope * shift, c.B0.estimate_num)).toBeGreaterThanOrEqual(6);
  });

  it("95 % interval uses the Student t quantile with n - 2 degrees of freedom", () => {
    // t(0.975, 34) = 2.032 to three decimals (standard t tables, from memory).
    const d = nist.datasets.Norris;
    const fit = fitLine(d.x, d.y);
    const half = (fit.slopeCI95[1] - fit.slopeCI95[0]) / 2;
    expect(half / fit.slopeStdErr).toBeCloseTo(2.032, 3);
  });
});
