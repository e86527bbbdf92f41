// The marking k on honest runs, against ground truth from the odex ODE integrator at rtol 1e-12
// (scripts/audit/simulate.ts; the full audit with 1,000 runs per scenario is
// scripts/audit/accuracy.ts). Here a few hundred seeded runs per scenario, with bounds set so
// that a correct engine passes with a wide margin: with R runs the coverage count is binomial,
// sd = sqrt(R 0.95 0.05), about 12 for R = 400 (3.1 %), so 95 % +- 4.5 % is about +- 3.5 sd.

import { describe, expect, it } from "vitest";
import { auditGrid, exactFlags, prepare, simulate, SIM_KINDS, type Scenario } from "../../../scripts/audit/simulate.ts";

const RUNS = 400;
const grid = auditGrid();
const pick = (name: string): Scenario => {
  const s = grid.find((x) => x.name === name);
  if (!s) throw new Error(`no scenario ${name}`);
  return s;
};

describe("marking k on honest runs (seeded noise, odex ground truth)", () => {
  // the scenarios where the unweighted line failed worst (its figures are in the README)
  const hard = [
    "A+B stoich, concentrationA, absolute 0.5 %, 99 %",
    "2nd order A, concentrationA, absolute 2 %, 95 %",
    "A+B stoich, signal, absolute 1 %, 97 %",
    "A+2B, B limits, concentrationB, absolute 0.5 %, 99 %",
    "A+B stoich, signal-Sinf-fitted, absolute 2 %, 95 %",
    "1st order, absorbance, relative 2 %, 95 %",
  ];
  for (const name of hard) {
    it(name, () => {
      const t = simulate(prepare(pick(name)), RUNS, 77);
      // target: at most 1 % of runs outside +-20 % (allow 2 % on 400 runs)
      expect(t.markOutside20 / t.runs).toBeLessThanOrEqual(0.02);
      expect(t.markCovered / t.runs).toBeGreaterThanOrEqual(0.905);
      expect(t.markCovered / t.runs).toBeLessThanOrEqual(0.995);
      // every flag but the hand line's bias note stays rare on honest data (target 1 %; 3 % here)
      for (const [code, count] of Object.entries(t.flags)) {
        if (code !== "straight-line-bias") expect(count / t.runs, code).toBeLessThanOrEqual(0.03);
      }
    });
  }

  it("the unweighted line, which marked before, really is worse on the hardest of them", () => {
    const t = simulate(prepare(pick("A+B stoich, concentrationA, absolute 0.5 %, 99 %")), 200, 5);
    expect(t.lineOutside20 / t.runs).toBeGreaterThan(0.3);
    expect(t.markOutside20 / t.runs).toBeLessThanOrEqual(0.02);
  });

  it("exact readings of every measurement kind raise no flag at all", () => {
    for (const s of grid) {
      if (s.noise !== "absolute" || s.noisePct !== 0.01) continue;
      expect(exactFlags(prepare(s)), s.name).toEqual([]);
    }
    expect(SIM_KINDS.length).toBe(6);
  });
});
