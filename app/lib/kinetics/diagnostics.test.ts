import { describe, expect, it } from "vitest";
import { runFit } from "./runFit.ts";
import type { FitRequest } from "./request.ts";
import { exactRun, normalSource, withNoise } from "./synthetic.ts";
import { checkTimeOrder, checkUnitSlip, type FlagCode } from "./diagnostics.ts";
import type { Feed, RateLaw } from "./rateLaws.ts";

// All data here are seeded synthetic runs with a known k (or exact ones), built to trip one check.

function request(law: RateLaw, k: number, opts: { n?: number; tEnd?: number; noise?: number; seed?: number; CB0?: number; b?: number } = {}): FitRequest {
  const b = opts.b ?? 1;
  const feed: Feed = { CA0: 0.02, CB0: opts.CB0 ?? 0.03, nu: b };
  const run = exactRun(law, feed, k, opts.tEnd ?? 1800, opts.n ?? 25);
  const values = opts.noise ? withNoise(run.CA, opts.noise, normalSource(opts.seed ?? 1)) : run.CA;
  const orders = { "first-order": [1, 0], "second-order-A": [2, 0], "second-order-AB": [1, 1] }[law];
  return {
    reaction: { a: 1, b, orderA: orders[0], orderB: orders[1] },
    feed: { CA0: feed.CA0, CB0: feed.CB0 },
    units: { time: "s", concentration: "mol/L" },
    measurement: { kind: "concentrationA" },
    points: run.t.map((t, i) => [t, values[i]]),
  };
}

const codes = (req: FitRequest): FlagCode[] => runFit(req).flags.map((f) => f.code);
const flag = (req: FitRequest, code: FlagCode) => runFit(req).flags.find((f) => f.code === code);

describe("diagnostics", () => {
  it("a clean, well-run data set raises no flag", () => {
    expect(codes(request("second-order-AB", 0.11, { noise: 3e-5 }))).toEqual([]);
  });

  it("few-points: under 5 points", () => {
    const f = flag(request("second-order-AB", 0.11, { n: 4 }), "few-points");
    expect(f?.rows).toEqual([0, 1, 2, 3]);
    expect(flag(request("second-order-AB", 0.11, { n: 5 }), "few-points")).toBeUndefined();
  });

  it("low-conversion: under 20 % of the limiting reagent reacted", () => {
    // B limits (CB0 = 0.03 < 2 x 0.02); the run stops early
    const low = request("second-order-AB", 0.11, { b: 2, tEnd: 40, noise: 1e-5 });
    const f = flag(low, "low-conversion");
    expect(f?.rows).toEqual([24]);
    expect(f?.message).toMatch(/\(B\)/);
    expect(flag(request("second-order-AB", 0.11, { b: 2, tEnd: 400 }), "low-conversion")).toBeUndefined();
  });

  it("unit-slip: times in seconds entered as minutes make k 60 times too small", () => {
    const req = request("second-order-AB", 0.11);
    req.units.time = "min";
    req.reference = { k: 0.11 };
    const f = flag(req, "unit-slip");
    expect(f?.message).toMatch(/1\/60\.0 times/);
    expect(f?.message).toMatch(/seconds entered as minutes/);
    const right = request("second-order-AB", 0.11);
    right.reference = { k: 0.11 };
    expect(flag(right, "unit-slip")).toBeUndefined();
  });

  it("unit-slip: the factors 60, 3600 and 1000 and their inverses, and nothing in between", () => {
    for (const factor of [60, 3600, 1000, 1 / 60, 1 / 3600, 1 / 1000]) {
      expect(checkUnitSlip(0.1 * factor * 1.2, 0.1)?.code).toBe("unit-slip");
    }
    for (const ratio of [1, 1.3, 10, 250, 1 / 10, 1 / 250]) expect(checkUnitSlip(0.1 * ratio, 0.1)).toBeNull();
  });

  it("curvature: a first-order law fitted to second-order data bends", () => {
    const req = request("second-order-A", 0.2, { n: 40, tEnd: 3000, noise: 5e-5, seed: 4 });
    req.reaction.orderA = 1;
    const f = flag(req, "curvature");
    expect(f).toBeDefined();
    expect(f!.rows.length).toBeGreaterThan(3);
    // and the comparison names the law that fits
    const result = runFit(req);
    expect(result.orderComparison!.best).toBe("second-order-A");
    expect(result.flags.map((x) => x.code)).toContain("order-mismatch");
  });

  it("curvature: rarely raised on data that follow the law (seeded noise, 200 repetitions)", () => {
    const normal = normalSource(77);
    let raised = 0;
    const base = request("second-order-AB", 0.11, { n: 40 });
    for (let rep = 0; rep < 200; rep++) {
      const req = { ...base, points: base.points.map(([t, c]) => [t, c + 5e-5 * normal()] as [number, number]), options: { compareOrders: false } };
      if (codes(req).includes("curvature")) raised++;
    }
    // one-sided level 0.005: about 1 in 200 expected
    expect(raised).toBeLessThanOrEqual(4);
  });

  it("beyond-asymptote: values at or past the long-time limit are flagged and left out of the line", () => {
    // A + 2B, equal feeds: CA cannot fall below CA0/2 = 0.01 (common practice, no source)
    const req = request("second-order-AB", 0.11, { b: 2, CB0: 0.02, tEnd: 5000, n: 20 });
    req.points[17][1] = 0.01;
    req.points[19][1] = 0.0098;
    const result = runFit(req);
    const f = result.flags.find((x) => x.code === "beyond-asymptote");
    // row 17 sits exactly at the limit, within noise: left out of the lines, not flagged
    expect(f?.rows).toEqual([19]);
    expect(f?.message).toMatch(/CA = 0\.01 mol\/L/);
    expect(result.n).toBe(18);
    expect(result.line.rows).not.toContain(17);
    expect(result.weightedLine.excludedRows).toEqual([17, 19]);
  });

  it("beyond-asymptote: a conversion of 1 or more", () => {
    const req = request("first-order", 2e-3, { CB0: 1 });
    req.measurement = { kind: "conversionA" };
    req.points = req.points.map(([t, c]) => [t, 1 - c / 0.02]);
    req.points[24][1] = 1.03;
    expect(flag(req, "beyond-asymptote")?.rows).toEqual([24]);
  });

  it("time-order: duplicate, negative and decreasing times, each row named", () => {
    expect(checkTimeOrder([0, 1, 2, 3])).toBeNull();
    const f = checkTimeOrder([-1, 0, 2, 2, 1, 5]);
    expect(f?.rows).toEqual([0, 3, 4]);
    expect(f?.message).toMatch(/1 negative, 1 repeating an earlier time, 1 earlier than the row before/);
    const req = request("second-order-AB", 0.11);
    [req.points[5], req.points[6]] = [req.points[6], req.points[5]];
    expect(flag(req, "time-order")?.rows).toEqual([6]);
  });

  it("straight-line-bias: near the long-time limit the straight line distorts the noise, the curve fit does not", () => {
    // A + 2B, equal feeds, run to 99.98 % of the limit: ln[(CB CA0)/(CB0 CA)] blows the noise up as CB -> 0
    const req = request("second-order-AB", 0.11, { b: 2, CB0: 0.02, tEnd: 3600, n: 13, noise: 2e-5, seed: 3 });
    const result = runFit(req);
    expect(result.flags.map((f) => f.code)).toContain("straight-line-bias");
    expect(Math.abs(result.nonlinear.k - 0.11) / 0.11).toBeLessThan(0.03);
    // the unweighted (hand) line is off; the weighted line that marks is not
    expect(Math.abs(result.line.k - 0.11) / 0.11).toBeGreaterThan(0.15);
    expect(Math.abs(result.k - 0.11) / 0.11).toBeLessThan(0.03);
    // the same run stopped at 96 % of the limit is fine
    expect(codes(request("second-order-AB", 0.11, { b: 2, CB0: 0.02, tEnd: 1200, n: 13, noise: 2e-5, seed: 3 }))).toEqual([]);
  });

  it("fit-not-converged: data that rise instead of fall leave no best k > 0", () => {
    const req = request("second-order-AB", 0.11, { n: 8 });
    req.points = req.points.map(([t], i) => [t, 0.02 + 1e-4 * i]);
    const result = runFit(req);
    expect(result.flags.map((f) => f.code)).toContain("fit-not-converged");
    expect(result.k).toBeLessThan(0);
  });
});

