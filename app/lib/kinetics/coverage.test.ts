// Coverage of the 95 % intervals on seeded synthetic data with a known k. With R repetitions the
// count is binomial, sd = sqrt(R * 0.95 * 0.05), about 6.9 for R = 1000; the accepted band is
// the expected 950 +/- 3 sd.

import { describe, expect, it } from "vitest";
import { fitLine } from "./linearFit.ts";
import { fitNonlinear } from "./nonlinearFit.ts";
import { lineY, type Feed } from "./rateLaws.ts";
import { exactRun, normalSource } from "./synthetic.ts";

const REPS = 1000;
const LOW = 929;
const HIGH = 971;

describe("95 % confidence intervals cover the true k about 95 % of the time", () => {
  it("straight-line fit, first order, constant relative error (so ln(CA0/CA) has constant noise)", () => {
    // Counted with this seed: 951 of 1000 (Mersenne Twister source).
    const feed: Feed = { CA0: 0.02, CB0: 1, nu: 1 };
    const k = 1.5e-3;
    const run = exactRun("first-order", feed, k, 1200, 12);
    const normal = normalSource(20240611);
    let covered = 0;
    for (let rep = 0; rep < REPS; rep++) {
      const y = run.CA.map((c) => lineY("first-order", feed, c * Math.exp(0.02 * normal())));
      const fit = fitLine(run.t, y);
      if (fit.slopeCI95[0] <= k && k <= fit.slopeCI95[1]) covered++;
    }
    expect(covered).toBeGreaterThanOrEqual(LOW);
    expect(covered).toBeLessThanOrEqual(HIGH);
  });

  it("nonlinear fit, A + B with unequal feed, constant absolute error on CA", () => {
    // Counted with this seed: 943 of 1000 (a separate 10,000-repetition run with seed 43 gave 9504).
    const feed: Feed = { CA0: 0.02, CB0: 0.03, nu: 1 };
    const k = 0.11;
    const run = exactRun("second-order-AB", feed, k, 1800, 15);
    const normal = normalSource(42);
    let covered = 0;
    for (let rep = 0; rep < REPS; rep++) {
      const values = run.CA.map((c) => c + 1.5e-4 * normal());
      const fit = fitNonlinear({ law: "second-order-AB", feed, t: run.t, values, map: { offset: 0, slope: 1 } });
      if (fit.kCI95[0] <= k && k <= fit.kCI95[1]) covered++;
    }
    expect(covered).toBeGreaterThanOrEqual(LOW);
    expect(covered).toBeLessThanOrEqual(HIGH);
  });
});
