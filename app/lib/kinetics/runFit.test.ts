import { describe, expect, it } from "vitest";
import { runFit } from "./runFit.ts";
import { validateFitRequest, type FitRequest } from "./request.ts";
import { concentrationA, type Feed, type RateLaw } from "./rateLaws.ts";
import { rateConstantAt } from "./arrhenius.ts";
import { exactRun, normalSource, withNoise } from "./synthetic.ts";

const ORDERS: Record<RateLaw, [number, number]> = {
  "first-order": [1, 0],
  "second-order-A": [2, 0],
  "second-order-AB": [1, 1],
};

/** A request built from seeded synthetic data with a known k (SI), expressed in the given units. */
function syntheticRequest(opts: {
  law: RateLaw;
  k: number;
  a?: number;
  b?: number;
  CA0?: number;
  CB0?: number;
  tEndS?: number;
  n?: number;
  time?: "s" | "min" | "h";
  concentration?: "mol/L" | "mmol/L";
  noise?: number;
  seed?: number;
  measure?: (CA: number, feed: Feed) => number;
  measurement?: FitRequest["measurement"];
}): FitRequest {
  const a = opts.a ?? 1;
  const b = opts.b ?? 1;
  const feed: Feed = { CA0: opts.CA0 ?? 0.02, CB0: opts.CB0 ?? 0.03, nu: b / a };
  const run = exactRun(opts.law, feed, opts.k, opts.tEndS ?? 1800, opts.n ?? 25);
  const tScale = { s: 1, min: 60, h: 3600 }[opts.time ?? "s"];
  const cScale = (opts.concentration ?? "mol/L") === "mol/L" ? 1 : 1e-3;
  const measure = opts.measure ?? ((c: number) => c / cScale);
  let values = run.CA.map((c) => measure(c, feed));
  if (opts.noise) values = withNoise(values, opts.noise, normalSource(opts.seed ?? 1));
  const [orderA, orderB] = ORDERS[opts.law];
  return {
    reaction: { a, b, orderA, orderB },
    feed: { CA0: feed.CA0 / cScale, CB0: feed.CB0 / cScale },
    units: { time: opts.time ?? "s", concentration: opts.concentration ?? "mol/L" },
    measurement: opts.measurement ?? { kind: "concentrationA" },
    points: run.t.map((t, i) => [t / tScale, values[i]]),
  };
}

describe("runFit on exact synthetic data (known k)", () => {
  it("returns the contract fields, k per second whatever the input units", () => {
    const k = 0.11; // L/(mol s)
    for (const time of ["s", "min", "h"] as const) {
      for (const concentration of ["mol/L", "mmol/L"] as const) {
        const result = runFit(syntheticRequest({ law: "second-order-AB", k, time, concentration }));
        expect(result.model).toBe("second-order-AB-unequal");
        expect(result.kUnit).toBe("L/(mol*s)");
        expect(result.k / k).toBeCloseTo(1, 9);
        expect(result.nonlinear.k / k).toBeCloseTo(1, 9);
        expect(result.r2).toBeCloseTo(1, 12);
        expect(result.n).toBe(25);
        expect(result.kCI95[0]).toBeLessThanOrEqual(result.k);
        expect(result.kCI95[1]).toBeGreaterThanOrEqual(result.k);
        expect(result.flags).toEqual([]);
        expect(result.units).toEqual({ time, concentration });
      }
    }
  });

  it("picks the model name from the orders and the feed", () => {
    const names = [
      runFit(syntheticRequest({ law: "first-order", k: 1e-3, b: 1, CB0: 1 })).model,
      runFit(syntheticRequest({ law: "second-order-A", k: 0.1 })).model,
      runFit(syntheticRequest({ law: "second-order-AB", k: 0.1, b: 2, CB0: 0.04 })).model,
      runFit(syntheticRequest({ law: "second-order-AB", k: 0.1, b: 2, CB0: 0.02 })).model,
    ];
    expect(names).toEqual(["first-order", "second-order-A", "second-order-AB-stoichiometric", "second-order-AB-unequal"]);
    expect(runFit(syntheticRequest({ law: "first-order", k: 1e-3, b: 1, CB0: 1 })).kUnit).toBe("1/s");
  });

  it("gives the same k from every kind of measurement", () => {
    const k = 0.11;
    const kinds: { measurement: FitRequest["measurement"]; measure: (c: number, f: Feed) => number }[] = [
      { measurement: { kind: "concentrationB" }, measure: (c, f) => f.CB0 - f.nu * (f.CA0 - c) },
      { measurement: { kind: "conversionA" }, measure: (c, f) => 1 - c / f.CA0 },
      // B limits (CB0 = 0.02 < 2 x 0.02): complete conversion of B at CA = 0.01
      { measurement: { kind: "signal", S0: 2.4, Sinf: 0.9 }, measure: (c, f) => 2.4 - ((f.CA0 - c) / 0.01) * 1.5 },
      { measurement: { kind: "signal", S0: 2.4 }, measure: (c, f) => 2.4 - ((f.CA0 - c) / 0.01) * 1.5 },
      {
        measurement: { kind: "absorbance", species: "A", epsilon: 40, pathCm: 1, baseline: 0.02 },
        measure: (c) => 0.02 + 40 * c,
      },
      { measurement: { kind: "absorbance", species: "B", epsilon: 25, pathCm: 2 }, measure: (c, f) => 50 * (f.CB0 - f.nu * (f.CA0 - c)) },
    ];
    for (const { measurement, measure } of kinds) {
      const result = runFit(syntheticRequest({ law: "second-order-AB", k, b: 2, CB0: 0.02, tEndS: 4000, measurement, measure }));
      expect(result.k / k, measurement.kind).toBeCloseTo(1, 7);
      expect(result.nonlinear.k / k, measurement.kind).toBeCloseTo(1, 7);
    }
    const fitted = runFit(
      syntheticRequest({ law: "second-order-AB", k, b: 2, CB0: 0.02, tEndS: 4000, measurement: kinds[3].measurement, measure: kinds[3].measure }),
    );
    expect(fitted.nonlinear.Sinf!.value).toBeCloseTo(0.9, 8);
  });

  it("is continuous through a stoichiometric feed, across the change of model name", () => {
    // one data set (exact, made with a stoichiometric A + 2B feed) fitted with feeds just off it
    const base = syntheticRequest({ law: "second-order-AB", k: 0.11, b: 2, CB0: 0.04, noise: 5e-5, seed: 9 });
    const fitWith = (eps: number) => runFit({ ...base, feed: { CA0: 0.02, CB0: 0.04 * (1 + eps) } });
    const k0 = fitWith(0).k;
    const slope = Math.max(...[-1e-3, 1e-3].map((e) => Math.abs(fitWith(e).k - k0) / (k0 * 1e-3)));
    for (const eps of [-1e-5, -1.1e-6, -0.9e-6, -1e-9, -1e-13, 1e-13, 1e-9, 0.9e-6, 1.1e-6, 1e-5]) {
      const r = fitWith(eps);
      expect(r.model).toBe(Math.abs(eps) > 1e-6 ? "second-order-AB-unequal" : "second-order-AB-stoichiometric");
      expect(Math.abs(r.k - k0) / k0).toBeLessThanOrEqual(2 * slope * Math.abs(eps) + 1e-12);
      expect(Math.abs(r.nonlinear.k - fitWith(0).nonlinear.k) / k0).toBeLessThanOrEqual(2 * slope * Math.abs(eps) + 1e-9);
    }
  });

  it("reports the intercept as a start-time offset", () => {
    // the clock started 2 min after mixing: every time reads 2 min short
    const req = syntheticRequest({ law: "first-order", k: 1e-3, b: 1, CB0: 1, time: "min", tEndS: 1800 });
    req.points = req.points.slice(3).map(([t, v]) => [t - 2, v]);
    const result = runFit(req);
    expect(result.k / 1e-3).toBeCloseTo(1, 9);
    expect(result.line.timeOffset).toBeCloseTo(2, 8);
  });

  it("fits through the origin on request", () => {
    const req = syntheticRequest({ law: "second-order-A", k: 0.1, noise: 1e-4, seed: 3 });
    req.options = { lineThroughOrigin: true };
    const result = runFit(req);
    expect(result.line.throughOrigin).toBe(true);
    expect(result.line.intercept).toBe(0);
    expect(Math.abs(result.k - 0.1) / 0.1).toBeLessThan(0.05);
  });
});

describe("reference check", () => {
  it("carries the reference k to the run temperature with Ea and reports the deviation", () => {
    const kRef = 0.112;
    const kAt30 = rateConstantAt(kRef, 298.15, 48.37e3, 303.15);
    const req = syntheticRequest({ law: "second-order-AB", k: kAt30 * 1.05 });
    req.temperatureC = 30;
    req.reference = { k: kRef, TrefC: 25, EaKJ: 48.37, tolerancePct: 10 };
    const result = runFit(req);
    expect(result.reference!.kAtT).toBeCloseTo(kAt30, 14);
    expect(result.reference!.deviationPct).toBeCloseTo(5, 6);
    expect(result.reference!.withinTolerance).toBe(true);
    req.reference.tolerancePct = 4;
    expect(runFit(req).reference!.withinTolerance).toBe(false);
  });

  it("without EaKJ, k is taken as independent of temperature", () => {
    const req = syntheticRequest({ law: "second-order-AB", k: 0.1 });
    req.temperatureC = 40;
    req.reference = { k: 0.1 };
    const result = runFit(req);
    expect(result.reference!.kAtT).toBe(0.1);
    expect(Math.abs(result.reference!.deviationPct)).toBeLessThan(1e-6);
    expect(result.reference!.tolerancePct).toBe(20);
  });
});

describe("order comparison", () => {
  for (const law of ["first-order", "second-order-A", "second-order-AB"] as const) {
    it(`finds ${law} best for data made with it (seeded noise, known k)`, () => {
      const k = law === "first-order" ? 1.5e-3 : 0.11;
      const req = syntheticRequest({ law, k, b: 1, CB0: 0.05, n: 30, tEndS: 3000, noise: 5e-5, seed: 5 });
      const result = runFit(req);
      const expected = law === "second-order-AB" ? "second-order-AB-unequal" : law;
      expect(result.orderComparison!.best).toBe(expected);
      expect(result.orderComparison!.laws).toHaveLength(3);
      expect(result.flags.map((f) => f.code)).not.toContain("order-mismatch");
    });
  }

  it("without B in the feed (A -> products) only the laws in A alone are compared", () => {
    const req = syntheticRequest({ law: "first-order", k: 2e-3, b: 0, CB0: 0 });
    req.feed = { CA0: 0.02 };
    const result = runFit(req);
    expect(result.orderComparison!.laws.map((l) => l.model)).toEqual(["first-order", "second-order-A"]);
    expect(result.k / 2e-3).toBeCloseTo(1, 9);
  });

  it("on a long record compares the laws on evenly spaced rows, and still finds the right one", () => {
    const req = syntheticRequest({ law: "second-order-A", k: 0.11, n: 12001, tEndS: 3000, noise: 1e-4, seed: 6 });
    const result = runFit(req);
    expect(result.orderComparison!.points).toBe(4001); // every 3rd row, 5000 at most
    expect(result.orderComparison!.best).toBe("second-order-A");
    const asked = result.orderComparison!.laws.find((l) => l.model === "second-order-A")!;
    // the same law on a third of the rows: same k within the larger uncertainty
    expect(Math.abs(asked.k - result.nonlinear.k)).toBeLessThan(3 * asked.kStdErr);
    expect(result.n).toBe(12001);
  });

  it("can be switched off", () => {
    const req = syntheticRequest({ law: "second-order-A", k: 0.1 });
    req.options = { compareOrders: false };
    expect(runFit(req).orderComparison).toBeUndefined();
  });
});

describe("predicted curve", () => {
  it("follows the closed form in the request's units", () => {
    const req = syntheticRequest({ law: "second-order-A", k: 0.1, time: "min", concentration: "mmol/L" });
    const result = runFit(req);
    const feed: Feed = { CA0: 0.02, CB0: 0.03, nu: 1 };
    expect(result.curve.t[0]).toBe(0);
    expect(result.curve.t.at(-1)).toBeCloseTo(30, 12);
    result.curve.t.forEach((t, i) => {
      expect(result.curve.CA[i]).toBeCloseTo(concentrationA("second-order-A", feed, 0.1, t * 60) * 1000, 8);
    });
  });

  it("serialises to JSON with the contract fields present", () => {
    const req = syntheticRequest({ law: "second-order-AB", k: 0.1, noise: 1e-4 });
    expect(validateFitRequest(JSON.parse(JSON.stringify(req))).ok).toBe(true);
    const out = JSON.parse(JSON.stringify(runFit(req)));
    for (const key of ["model", "k", "kUnit", "kStdErr", "kCI95", "r2", "n", "nonlinear", "flags"]) expect(out).toHaveProperty(key);
    expect(Object.keys(out.nonlinear)).toEqual(expect.arrayContaining(["k", "kStdErr"]));
  });
});
