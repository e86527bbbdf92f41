import { describe, expect, it } from "vitest";
import { fromCA, measurementMap, toCA, type Measurement } from "./measurement.ts";
import type { Feed } from "./rateLaws.ts";

// A + 2 B, B in slight excess
const feed: Feed = { CA0: 0.02, CB0: 0.05, nu: 2 };
const CA = 0.013;
const CB = feed.CB0 - feed.nu * (feed.CA0 - CA); // stoichiometry (common practice, no source)

describe("measured quantity -> CA", () => {
  it("concentration of A is CA itself", () => {
    expect(toCA(measurementMap({ kind: "concentrationA" }, feed), CA)).toBe(CA);
  });

  it("concentration of B maps through CB = CB0 - nu (CA0 - CA)", () => {
    const map = measurementMap({ kind: "concentrationB" }, feed);
    expect(fromCA(map, CA)).toBeCloseTo(CB, 15);
    expect(toCA(map, CB)).toBeCloseTo(CA, 15);
  });

  it("conversion of A is XA = (CA0 - CA)/CA0", () => {
    const map = measurementMap({ kind: "conversionA" }, feed);
    expect(toCA(map, 0.35)).toBeCloseTo(feed.CA0 * 0.65, 15);
    expect(toCA(map, 0)).toBeCloseTo(feed.CA0, 15);
  });

  it("Beer-Lambert absorbance of A or B: A = baseline + epsilon l C (common practice, no source)", () => {
    const a: Measurement = { kind: "absorbance", species: "A", epsilon: 1200, pathCm: 1, baseline: 0.05 };
    expect(toCA(measurementMap(a, feed), 0.05 + 1200 * 1 * CA)).toBeCloseTo(CA, 14);
    const b: Measurement = { kind: "absorbance", species: "B", epsilon: 300, pathCm: 0.5 };
    expect(toCA(measurementMap(b, feed), 300 * 0.5 * CB)).toBeCloseTo(CA, 14);
  });

  it("a signal linear in the extent of reaction, as in the conductivity method", () => {
    // CA0 - CA = (CA0 - CA_inf)(kappa0 - kappa)/(kappa0 - kappa_inf): Walker, Proc. R. Soc.
    // Lond. A 78 (1906) 157 (citation from memory; see shared/reference/kinetics-literature.md).
    const kappa0 = 2.4;
    const kappaInf = 0.9;
    // A limits here (CB0 > nu CA0), so CA_inf = 0
    const kappa = kappa0 - ((feed.CA0 - CA) / (feed.CA0 - 0)) * (kappa0 - kappaInf);
    const map = measurementMap({ kind: "signal", S0: kappa0, Sinf: kappaInf }, feed);
    expect(toCA(map, kappa)).toBeCloseTo(CA, 15);
    expect(toCA(map, kappa0)).toBeCloseTo(feed.CA0, 15);
  });

  it("with B limiting, Sinf corresponds to CA = CA0 - CB0/nu", () => {
    const limitedByB: Feed = { CA0: 0.02, CB0: 0.02, nu: 2 };
    const map = measurementMap({ kind: "signal", S0: 10, Sinf: 4 }, limitedByB);
    expect(toCA(map, 4)).toBeCloseTo(0.01, 15);
    expect(toCA(map, 7)).toBeCloseTo(0.015, 15);
  });

  it("a fitted Sinf overrides the one in the measurement", () => {
    const map = measurementMap({ kind: "signal", S0: 10 }, feed, 2);
    expect(toCA(map, 2)).toBeCloseTo(0, 15);
    expect(() => measurementMap({ kind: "signal", S0: 10 }, feed)).toThrow(/Sinf/);
  });
});
