// The fit command end to end: spawns `npx tsx scripts/fit.ts` with a request on stdin.
// Lives under tests/unit/ because it uses node:child_process; the engine imports no node modules.

import { describe, expect, it } from "vitest";
import { spawnSync } from "node:child_process";
import path from "node:path";
import { exactRun, normalSource, withNoise } from "~/lib/kinetics/synthetic.ts";

const root = path.resolve(import.meta.dirname, "..", "..");

function runCommand(stdin: string) {
  const res = spawnSync("npx", ["tsx", "scripts/fit.ts"], { cwd: root, input: stdin, encoding: "utf8", timeout: 60000 });
  return { status: res.status, out: res.stdout, err: res.stderr };
}

describe("npm run fit (scripts/fit.ts)", () => {
  it("writes the result for a valid request and exits 0", () => {
    // seeded synthetic data, A + 2B with equal feeds, known k = 0.11 L/(mol s); times in minutes
    const feed = { CA0: 0.02, CB0: 0.02, nu: 2 };
    const run = exactRun("second-order-AB", feed, 0.11, 1200, 13);
    const values = withNoise(run.CA, 2e-5, normalSource(3));
    const request = {
      reaction: { a: 1, b: 2, orderA: 1, orderB: 1 },
      feed: { CA0: 0.02, CB0: 0.02 },
      units: { time: "min", concentration: "mol/L" },
      measurement: { kind: "concentrationA" },
      points: run.t.map((t, i) => [t / 60, values[i]]),
      temperatureC: 25,
      reference: { k: 0.11, TrefC: 25, EaKJ: 45, tolerancePct: 10 },
    };
    const { status, out } = runCommand(JSON.stringify(request));
    expect(status).toBe(0);
    const result = JSON.parse(out);
    expect(result.model).toBe("second-order-AB-unequal");
    expect(result.kUnit).toBe("L/(mol*s)");
    expect(Math.abs(result.k - 0.11) / 0.11).toBeLessThan(0.05);
    expect(result.kStdErr).toBeGreaterThan(0);
    expect(result.kCI95).toHaveLength(2);
    expect(result.r2).toBeGreaterThan(0.99);
    expect(result.n).toBe(13);
    expect(Math.abs(result.nonlinear.k - 0.11) / 0.11).toBeLessThan(0.05);
    expect(result.nonlinear.kStdErr).toBeGreaterThan(0);
    expect(Array.isArray(result.flags)).toBe(true);
    expect(result.reference.kAtT).toBe(0.11);
    expect(typeof result.reference.deviationPct).toBe("number");
    expect(result.reference.withinTolerance).toBe(true);
  }, 60000);

  it("exits 2 with every error and its path for an invalid request", () => {
    const request = {
      reaction: { a: 1, b: 1, orderA: 1, orderB: 1 },
      feed: { CA0: 0, CB0: 0.02 },
      units: { time: "min", concentration: "mol/L" },
      measurement: { kind: "signal" },
      points: [
        [0, 2.4],
        [5, "x"],
      ],
    };
    const { status, out } = runCommand(JSON.stringify(request));
    expect(status).toBe(2);
    const { errors } = JSON.parse(out);
    expect(errors.map((e: { path: string }) => e.path).sort()).toEqual(["feed.CA0", "measurement.S0", "points", "points[1][1]"]);
    for (const e of errors) expect(e.message.length).toBeGreaterThan(5);
  }, 60000);

  it("fits a pooled Arrhenius request: Ea and A with intervals, residuals per bench", () => {
    // benches made from k(25 C) = 0.112 L/(mol s), Ea = 48.37 kJ/mol (Tsujikawa and Inoue 1966,
    // see shared/reference/kinetics-literature.md), each k off by a seeded 2 % with SE 2 %
    const normal = normalSource(21);
    const benches = [15, 20, 25, 30, 35].map((c, i) => {
      const k = 0.112 * Math.exp((-48370 / 8.314462618) * (1 / (c + 273.15) - 1 / 298.15)) * Math.exp(0.02 * normal());
      return { id: `B${i + 1}`, temperatureC: c, k, kStdErr: 0.02 * k };
    });
    const { status, out } = runCommand(JSON.stringify({ arrhenius: { benches } }));
    expect(status).toBe(0);
    const r = JSON.parse(out);
    expect(r.weighting).toBe("k-uncertainty");
    expect(r.EaKJCI95[0]).toBeLessThan(48.37);
    expect(r.EaKJCI95[1]).toBeGreaterThan(48.37);
    expect(r.benches.map((b: { id: string }) => b.id)).toEqual(["B1", "B2", "B3", "B4", "B5"]);
    expect(r.ACI95).toHaveLength(2);
  }, 60000);

  it("exits 2 for text that is not JSON", () => {
    const { status, out } = runCommand("{ not json");
    expect(status).toBe(2);
    expect(JSON.parse(out).errors[0].message).toMatch(/not valid JSON/);
  }, 60000);
});
