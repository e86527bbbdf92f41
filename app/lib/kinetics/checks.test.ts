// The checks a marker needs, each on seeded synthetic runs with a known k (ground truth from
// odex, scripts/audit/simulate.ts) built to trip one of them, and the same run left honest.

import { describe, expect, it } from "vitest";
import { runFit, type FitResult } from "./runFit.ts";
import { validateFitRequest, validateRequest, type FitRequest } from "./request.ts";
import { normalSource } from "./synthetic.ts";
import { checkUnitSlip } from "./diagnostics.ts";
import { auditGrid, prepare, type Scenario } from "../../../scripts/audit/simulate.ts";

const grid = auditGrid();
const scenario = (name: string): Scenario => grid.find((s) => s.name === name)!;

/** One seeded noisy run of a scenario, as a request. */
function noisy(name: string, seed = 1, points = 20): FitRequest {
  const p = prepare({ ...scenario(name), points });
  const normal = normalSource(seed);
  return { ...p.base, points: p.times.map((t, i) => [t, p.exact[i] + p.sd[i] * normal()]) };
}
const codes = (r: FitResult) => r.flags.map((f) => f.code);
const AB = "A+B unequal, concentrationA, absolute 1 %, 97 %";

describe("feed-mismatch", () => {
  it("readings in mmol/L against a feed in mol/L: the factor and the cause", () => {
    const req = noisy(AB);
    req.points = req.points.map(([t, c]) => [t, c * 1000]);
    const r = runFit(req);
    const f = r.flags.find((x) => x.code === "feed-mismatch");
    expect(f).toBeDefined();
    expect(f!.factor!).toBeGreaterThan(900);
    expect(f!.message).toMatch(/near 1000/);
    expect(f!.message).toMatch(/mmol\/L/);
    // the k is meaningless here, so no unit-slip guess is offered beside it
    expect(codes(r)).not.toContain("unit-slip");
  });

  it("a feed in mmol/L with readings in mol/L: the first reading is 1/1000 of the feed", () => {
    const req = noisy(AB);
    req.feed = { CA0: req.feed.CA0 * 1000, CB0: req.feed.CB0! * 1000 };
    const f = runFit(req).flags.find((x) => x.code === "feed-mismatch");
    expect(f?.message).toMatch(/1\/1000|near 1\/1000/);
  });

  it("a mistyped CA0 (readings start 25 % above it)", () => {
    const req = noisy(AB);
    req.feed = { ...req.feed, CA0: req.feed.CA0 / 1.25 };
    const f = runFit(req).flags.find((x) => x.code === "feed-mismatch");
    expect(f).toBeDefined();
    expect(f!.rows).toContain(0);
    expect(f!.factor!).toBeCloseTo(1.25, 1);
  });

  it("B readings against CB0", () => {
    const req = noisy("A+B unequal, concentrationB, absolute 1 %, 97 %");
    req.feed = { ...req.feed, CB0: req.feed.CB0! / 2 };
    const r = runFit(req);
    expect(codes(r)).toContain("feed-mismatch");
  });

  it("a conversion that goes past what the feed allows (B limits): the feed is not the one used", () => {
    const req = noisy("A+2B, B limits, conversionA, absolute 1 %, 97 %");
    // the readings came from CB0 = 0.03; a request saying 0.024 allows a conversion of 0.6 at most
    req.feed = { ...req.feed, CB0: 0.024 };
    expect(codes(runFit(req))).toContain("feed-mismatch");
  });

  it("is not raised on the honest runs", () => {
    for (let seed = 1; seed <= 20; seed++) expect(codes(runFit(noisy(AB, seed)))).not.toContain("feed-mismatch");
  });
});

describe("outlier", () => {
  it("names the row of one bad reading and shows k without it; the mark keeps every reading", () => {
    const req = noisy(AB, 3);
    const honest = runFit(req);
    const bad = structuredClone(req);
    bad.points[8][1] = bad.points[8][1] * 0.6; // a misread burette, invented
    const r = runFit(bad);
    const f = r.flags.find((x) => x.code === "outlier");
    expect(f?.rows).toEqual([8]);
    expect(f!.message).toMatch(/Row 8/);
    expect(Math.abs(f!.kWithout! - honest.k) / honest.k).toBeLessThan(0.03);
    expect(r.n).toBe(honest.n); // the mark still uses every reading
    expect(Math.abs(r.k - f!.kWithout!)).toBeGreaterThan(0);
  });
});

describe("range checks are request errors", () => {
  const base = noisy("1st order, conversionA, absolute 1 %, 97 %");
  it("conversion typed in percent", () => {
    const req = { ...base, points: base.points.map(([t, x]) => [t, x * 100]) };
    const v = validateFitRequest(req);
    expect(v.ok).toBe(false);
    if (!v.ok) expect(v.errors.map((e) => e.message).join(" ")).toMatch(/looks like percent; divide by 100/);
  });
  it("absurd magnitudes: 1e308, a time of centuries, a feed of 300 mol/L, an absorbance of 40", () => {
    const req = structuredClone(noisy(AB));
    req.points[2] = [req.points[2][0], 1e308];
    req.points[3] = [1e12, req.points[3][1]];
    req.feed.CA0 = 300;
    const v = validateFitRequest(req);
    expect(v.ok).toBe(false);
    if (!v.ok) expect(v.errors.map((e) => e.path)).toEqual(expect.arrayContaining(["feed.CA0", "points[2][1]", "points[3][0]"]));
    const abs = noisy("1st order, absorbance, absolute 1 %, 97 %");
    abs.points[4] = [abs.points[4][0], 40];
    abs.points[5] = [abs.points[5][0], -0.3];
    const va = validateFitRequest(abs);
    expect(va.ok).toBe(false);
    if (!va.ok) {
      expect(va.errors.map((e) => e.path)).toEqual(["points[4][1]", "points[5][1]"]);
      expect(va.errors[1].message).toMatch(/below the baseline/);
    }
  });
  it("temperatures in kelvin and Ea in J/mol are caught", () => {
    const req = { ...noisy(AB), temperatureC: 298.15 + 300, reference: { k: 0.11, TrefC: 25, EaKJ: 48000 } };
    const v = validateFitRequest(req);
    expect(v.ok).toBe(false);
    if (!v.ok) expect(v.errors.map((e) => e.path).sort()).toEqual(["reference.EaKJ", "temperatureC"]);
  });
  it("nothing crashes: one point, NaN and Infinity (as JSON would carry them), 100,000 points", () => {
    expect(validateFitRequest({ ...noisy(AB), points: [[0, 0.02]] }).ok).toBe(false);
    expect(validateFitRequest({ ...noisy(AB), points: [[0, NaN], [1, Infinity], [2, -Infinity]] }).ok).toBe(false);
    const long = noisy(AB, 2, 100_000);
    const r = runFit(long);
    expect(Math.abs(r.k - 0.11) / 0.11).toBeLessThan(0.01);
  }, 30_000); // a 100,000-point fit: over the 5 s default on a loaded machine
});

describe("no false alarms on exact data", () => {
  it("first-order conductivity, Sinf known: the two k agree and nothing is flagged", () => {
    const p = prepare(scenario("1st order, signal, absolute 1 %, 97 %"));
    const r = runFit(p.base);
    expect(r.flags).toEqual([]);
    expect(Math.abs(r.k - r.nonlinear.k) / r.k).toBeLessThan(1e-9);
  });
});

describe("order comparison", () => {
  it("stoichiometric A + B is one entry with second order in A, and the verdict is the requested law", () => {
    const r = runFit(noisy("A+B stoich, concentrationA, absolute 1 %, 97 %"));
    const oc = r.orderComparison!;
    expect(oc.laws).toHaveLength(2);
    const entry = oc.laws.find((l) => l.model === "second-order-AB-stoichiometric")!;
    expect(entry.equivalent).toEqual(["second-order-A"]);
    expect(oc.verdict).toBe("requested");
    expect(oc.criterion).toBe("AIC");
    expect(oc.threshold).toBe(10);
  });

  it("says cannot tell at low conversion with noise", () => {
    const s = { ...scenario("A+B unequal, concentrationA, absolute 2 %, 95 %"), conversion: 0.3, noisePct: 0.03 };
    const p = prepare(s);
    const normal = normalSource(11);
    let cannotTell = 0;
    let mismatch = 0;
    for (let rep = 0; rep < 40; rep++) {
      const r = runFit({ ...p.base, points: p.times.map((t, i) => [t, p.exact[i] + p.sd[i] * normal()]) });
      if (r.orderComparison!.verdict === "cannot-tell") cannotTell++;
      if (codes(r).includes("order-mismatch")) mismatch++;
    }
    expect(cannotTell).toBeGreaterThan(30);
    expect(mismatch).toBeLessThanOrEqual(1);
  });

  it("decides for the law that made the data when it is not the one asked for", () => {
    const req = noisy("2nd order A, concentrationA, absolute 0.5 %, 99 %");
    req.reaction = { ...req.reaction, orderA: 1, orderB: 0 };
    const r = runFit(req);
    expect(r.orderComparison!.verdict).toBe("other");
    expect(r.orderComparison!.best).toBe("second-order-A");
    expect(codes(r)).toContain("order-mismatch");
  });
});

describe("free start", () => {
  it("clock zeroed at the first sample, taken late: the curve fit estimates the offset and agrees with the line", () => {
    const req = noisy(AB, 4, 30);
    const lateBy = req.points[2][0]; // the first sample taken after about 20 % had reacted
    const late = req.points.slice(2).map(([t, c]) => [t - lateBy, c] as [number, number]);
    const r = runFit({ ...req, points: late });
    expect(r.nonlinear.start).toBeDefined();
    expect(r.nonlinear.start!.ci95[0]).toBeLessThan(lateBy);
    expect(r.nonlinear.start!.ci95[1]).toBeGreaterThan(lateBy);
    expect(Math.abs(r.nonlinear.k - 0.11) / 0.11).toBeLessThan(0.05);
    expect(Math.abs(r.k - 0.11) / 0.11).toBeLessThan(0.05);
    // every law got its own start: no false order mismatch
    expect(codes(r)).not.toContain("order-mismatch");
    const disagree = r.flags.find((f) => f.code === "fits-disagree");
    if (disagree) expect(disagree.prefer).toBe("curve");
  });
  it("a run that starts at the feed gets no offset", () => {
    expect(runFit(noisy(AB, 4, 30)).nonlinear.start).toBeUndefined();
  });
});

describe("k convention", () => {
  it("k is on A; a reference per unit of reaction for 2 A -> products is converted (k on A = 2 k_reaction)", () => {
    const p = prepare(scenario("2nd order A, concentrationA, absolute 1 %, 97 %"));
    const req: FitRequest = { ...p.base, reaction: { a: 2, b: 0, orderA: 2, orderB: 0 }, feed: { CA0: 0.02 } };
    const kOnA = 0.11;
    const asA = runFit({ ...req, reference: { k: kOnA } });
    const asReaction = runFit({ ...req, reference: { k: kOnA / 2, definedOn: "reaction" } });
    expect(asA.kDefinedOn).toBe("A");
    expect(asA.rateLaw).toBe("-dCA/dt = k CA^2");
    expect(asReaction.reference!.definedOn).toBe("reaction");
    expect(asReaction.reference!.kAtT).toBeCloseTo(kOnA, 12);
    expect(Math.abs(asReaction.reference!.deviationPct)).toBeLessThan(1e-6);
    expect(asReaction.reference!.withinTolerance).toBe(true);
  });
});

describe("unit-slip messages follow the ratio and the units involved", () => {
  it("a concentration factor for a second-order k, never for a first-order one", () => {
    expect(checkUnitSlip(0.11 / 1000, 0.11, true)!.message).toMatch(/mmol\/L entered as mol\/L/);
    expect(checkUnitSlip(0.11 * 1000, 0.11, true)!.message).toMatch(/mol\/L entered as mmol\/L/);
    const first = checkUnitSlip(1.5e-3 * 1000, 1.5e-3, false)!;
    expect(first.message).toMatch(/does not depend on the concentration unit/);
    expect(first.message).not.toMatch(/entered as/);
    expect(checkUnitSlip(0.11 / 3600, 0.11, true)!.message).toMatch(/seconds entered as hours/);
    expect(checkUnitSlip(0.11 * 60 / 1000, 0.11, true)!.message).toMatch(/mmol\/L entered as mol\/L.*minutes entered as seconds/);
  });
  it("whole runs: concentrations in mmol/L labelled mol/L (feed and readings alike)", () => {
    const req = noisy(AB);
    req.units = { ...req.units, concentration: "mmol/L" };
    req.feed = { CA0: req.feed.CA0 * 1000, CB0: req.feed.CB0! * 1000 };
    req.points = req.points.map(([t, c]) => [t, c * 1000]);
    // the numbers are mol/L x 1000 and labelled mmol/L: consistent, so no slip
    expect(codes(runFit(req))).not.toContain("unit-slip");
    const slip = { ...req, units: { ...req.units, concentration: "mol/L" as const } };
    const f = runFit(slip).flags.find((x) => x.code === "unit-slip");
    expect(f?.message).toMatch(/mmol\/L entered as mol\/L/);
  });
});

describe("pooled Arrhenius requests", () => {
  it("are told apart from fit requests and validated with paths", () => {
    const v = validateRequest({ arrhenius: { benches: [{ temperatureC: 20, k: 0.08 }, { temperatureC: 30, k: -1 }] } });
    expect(v.ok).toBe(false);
    if (!v.ok) expect(v.errors.map((e) => e.path).sort()).toEqual(["arrhenius.benches", "arrhenius.benches[1].k"]);
    const ok = validateRequest({ arrhenius: { benches: [20, 25, 30].map((c) => ({ temperatureC: c, k: 0.1 + c / 1000, kStdErr: 0.003 })) } });
    expect(ok.ok && ok.value.kind).toBe("arrhenius");
  });
});

describe("odd but valid requests", () => {
  it("never throw and always serialise: flat, reversed, sparse and random readings of every kind (seeded)", () => {
    const normal = normalSource(99);
    const u = () => Math.abs(normal()) % 1;
    const kinds: FitRequest["measurement"][] = [
      { kind: "concentrationA" },
      { kind: "concentrationB" },
      { kind: "conversionA" },
      { kind: "signal", S0: 2 },
      { kind: "signal", S0: 2, Sinf: 0.5 },
      { kind: "absorbance", species: "A", epsilon: 30, pathCm: 1 },
    ];
    let fitted = 0;
    for (let i = 0; i < 300; i++) {
      const [orderA, orderB] = [[1, 0], [2, 0], [1, 1]][i % 3];
      const kind = kinds[i % 6];
      const n = 3 + Math.floor(u() * 30);
      const mode = i % 5;
      const points: [number, number][] = [];
      for (let j = 0; j < n; j++) {
        const t = mode === 0 ? j : mode === 1 ? n - j : j * j * 3;
        const c = mode === 2 ? 0.01 : mode === 3 ? 0.02 * Math.exp(-j / 5) + 0.001 * normal() : Math.abs(0.02 * u());
        const v = kind.kind === "conversionA" ? Math.min(1, Math.abs(c * 40)) : kind.kind === "signal" ? 2 - c * 50 : kind.kind === "absorbance" ? 30 * c : c;
        points.push([t, v]);
      }
      const req = { reaction: { a: 1, b: 1 + (i % 2), orderA, orderB }, feed: { CA0: 0.02, CB0: 0.01 + 0.03 * u() }, units: { time: "s", concentration: "mol/L" }, measurement: kind, points, reference: { k: 0.1 } };
      const v = validateFitRequest(req);
      if (!v.ok) continue;
      const out = JSON.parse(JSON.stringify(runFit(v.request)));
      expect(Array.isArray(out.flags)).toBe(true);
      fitted++;
    }
    expect(fitted).toBeGreaterThan(250);
  });
});

describe("long records", () => {
  it("a 100,000-point record whose feed was mistyped is caught (the test runs on evenly spaced rows)", () => {
    const req = noisy(AB, 8, 100_000);
    req.feed = { ...req.feed, CA0: req.feed.CA0 / 1.25 };
    const f = runFit(req).flags.find((x) => x.code === "feed-mismatch");
    expect(f?.rows).toEqual([0]);
    expect(f!.factor!).toBeCloseTo(1.25, 1);
  });
});
