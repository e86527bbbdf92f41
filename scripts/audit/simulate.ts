// Seeded simulation of honest bench runs against an independent ground truth, for the accuracy
// audit (scripts/audit/accuracy.ts) and the engine's statistical tests.
// Ground truth: the rate equations integrated by odex (Gragg-Bulirsch-Stoer extrapolation,
// Hairer, Norsett and Wanner's ODEX ported to JavaScript) at relative tolerance 1e-12, with B
// carried as its own species rather than through the stoichiometric substitution the engine's
// closed forms use. Noise: seeded normal deviates (Mersenne Twister, synthetic.ts).

import { runFit, type FitRequest, type FitResult } from "../../app/lib/kinetics/index.ts";
import { normalSource } from "../../app/lib/kinetics/synthetic.ts";
import { concentrationA, finalCA, maxReactedA, type Feed, type RateLaw } from "../../app/lib/kinetics/rateLaws.ts";
import type { FlagCode } from "../../app/lib/kinetics/diagnostics.ts";

interface OdexSolver {
  relativeTolerance: number;
  absoluteTolerance: number;
  maxSteps: number;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], xEnd: number): { y: number[]; outcome: number };
}
// odex ships TypeScript source that does not compile under this project's strict settings:
// load it untyped (a non-literal specifier, so tsc does not follow it).
const odexName: string = "odex";
const { Solver } = (await import(/* @vite-ignore */ odexName)) as { Solver: new (n: number) => OdexSolver };

const ORDERS: Record<RateLaw, [number, number]> = {
  "first-order": [1, 0],
  "second-order-A": [2, 0],
  "second-order-AB": [1, 1],
};

/** CA and CB at each time, integrating dCA/dt = -r, dCB/dt = -nu r, r = k CA^alpha CB^beta. */
export function odeTruth(law: RateLaw, feed: Feed, k: number, times: readonly number[]): { CA: number[]; CB: number[] } {
  const [alpha, beta] = ORDERS[law];
  const rhs = (_x: number, y: number[]) => {
    const r = k * Math.max(y[0], 0) ** alpha * (beta === 0 ? 1 : Math.max(y[1], 0) ** beta);
    return [-r, -feed.nu * r];
  };
  const CA: number[] = [];
  const CB: number[] = [];
  let y = [feed.CA0, feed.CB0];
  let t = 0;
  for (const ti of times) {
    if (ti > t) {
      const solver = new Solver(2);
      solver.relativeTolerance = 1e-12;
      solver.absoluteTolerance = 1e-18;
      solver.maxSteps = 1e6;
      const out = solver.solve(rhs, t, y, ti);
      if (out.outcome !== 0) throw new Error("odex did not converge");
      y = out.y;
      t = ti;
    }
    CA.push(y[0]);
    CB.push(y[1]);
  }
  return { CA, CB };
}

export type SimKind = "concentrationA" | "concentrationB" | "conversionA" | "signal" | "signal-Sinf-fitted" | "absorbance";
export const SIM_KINDS: readonly SimKind[] = ["concentrationA", "concentrationB", "conversionA", "signal", "signal-Sinf-fitted", "absorbance"];

export interface Scenario {
  name: string;
  law: RateLaw;
  /** stoichiometric coefficient b (a = 1) and feed, mol/L */
  nu: number;
  CA0: number;
  CB0: number;
  k: number;
  kind: SimKind;
  noise: "absolute" | "relative";
  /** sd as a share: of the full change of the reading (absolute) or of the reading itself (relative) */
  noisePct: number;
  /** fraction of the limiting reagent reacted at the last reading */
  conversion: number;
  points: number;
}

const S0 = 2.4; // conductivity-like signal falling to Sinf as the reaction goes (invented values)
const SINF = 0.9;
const EPSILON = 40; // L/(mol cm), absorbance of A, 1 cm cell, baseline 0.02 (invented values)
const BASELINE = 0.02;

/** Time at which the limiting reagent is the given fraction reacted (closed form, only to place the readings). */
function timeFor(law: RateLaw, feed: Feed, k: number, fraction: number): number {
  const target = feed.CA0 - fraction * maxReactedA(feed);
  let lo = 0;
  let hi = 1;
  while (concentrationA(law, feed, k, hi) > target) hi *= 2;
  for (let i = 0; i < 100; i++) {
    const mid = (lo + hi) / 2;
    if (concentrationA(law, feed, k, mid) > target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

export interface Prepared {
  scenario: Scenario;
  times: number[];
  /** exact readings (no noise) */
  exact: number[];
  /** noise sd of each reading */
  sd: number[];
  base: FitRequest;
}

export function prepare(s: Scenario): Prepared {
  const feed: Feed = { CA0: s.CA0, CB0: s.CB0, nu: s.nu };
  const tEnd = timeFor(s.law, feed, s.k, s.conversion);
  const times = Array.from({ length: s.points }, (_, i) => (tEnd * i) / (s.points - 1));
  const { CA, CB } = odeTruth(s.law, feed, s.k, times);
  const reach = maxReactedA(feed);
  const end = finalCA(feed);
  let exact: number[];
  let measurement: FitRequest["measurement"];
  switch (s.kind) {
    case "concentrationA":
      exact = CA;
      measurement = { kind: "concentrationA" };
      break;
    case "concentrationB":
      exact = CB;
      measurement = { kind: "concentrationB" };
      break;
    case "conversionA":
      exact = CA.map((c) => 1 - c / s.CA0);
      measurement = { kind: "conversionA" };
      break;
    case "signal":
    case "signal-Sinf-fitted":
      exact = CA.map((c) => S0 + ((SINF - S0) * (s.CA0 - c)) / reach);
      measurement = s.kind === "signal" ? { kind: "signal", S0, Sinf: SINF } : { kind: "signal", S0 };
      break;
    case "absorbance":
      exact = CA.map((c) => BASELINE + EPSILON * c);
      measurement = { kind: "absorbance", species: "A", epsilon: EPSILON, pathCm: 1, baseline: BASELINE };
      break;
  }
  // the full change of the reading from the feed to the long-time limit
  const startValue = s.kind === "concentrationB" ? s.CB0 : exact[0];
  const limitValue =
    s.kind === "concentrationA" ? end : s.kind === "concentrationB" ? s.CB0 - s.nu * reach : s.kind === "conversionA" ? reach / s.CA0 : s.kind === "absorbance" ? BASELINE + EPSILON * end : SINF;
  const change = Math.abs(startValue - limitValue);
  const sd = exact.map((m) => (s.noise === "absolute" ? s.noisePct * change : s.noisePct * Math.abs(s.kind === "conversionA" ? 1 - m : m)));
  const [orderA, orderB] = ORDERS[s.law];
  const base: FitRequest = {
    reaction: { a: 1, b: s.nu, orderA, orderB },
    feed: { CA0: s.CA0, CB0: s.CB0 },
    units: { time: "s", concentration: "mol/L" },
    measurement,
    points: times.map((t, i) => [t, exact[i]]),
    temperatureC: 25,
    reference: { k: s.k, tolerancePct: 20 },
  };
  return { scenario: s, times, exact, sd, base };
}

export interface Tally {
  runs: number;
  /** marking k outside +-20 % of the truth */
  markOutside20: number;
  markCovered: number;
  /** the unweighted line (the estimator that marked before) */
  lineOutside20: number;
  lineCovered: number;
  curveOutside20: number;
  curveCovered: number;
  /** runs raising each flag */
  flags: Partial<Record<FlagCode, number>>;
  /** runs raising any flag other than the informational straight-line-bias */
  anyFlag: number;
}

/** `reps` seeded noisy runs of one scenario. */
export function simulate(p: Prepared, reps: number, seed: number): Tally {
  const normal = normalSource(seed);
  const k = p.scenario.k;
  const tally: Tally = { runs: 0, markOutside20: 0, markCovered: 0, lineOutside20: 0, lineCovered: 0, curveOutside20: 0, curveCovered: 0, flags: {}, anyFlag: 0 };
  for (let rep = 0; rep < reps; rep++) {
    const request: FitRequest = { ...p.base, points: p.times.map((t, i) => [t, p.exact[i] + p.sd[i] * normal()]) };
    const r = runFit(request);
    count(tally, r, k);
  }
  return tally;
}

function count(tally: Tally, r: FitResult, k: number) {
  tally.runs++;
  const outside = (x: number) => !(Math.abs(x - k) <= 0.2 * k);
  const covers = (ci: [number, number]) => ci[0] <= k && k <= ci[1];
  if (outside(r.k)) tally.markOutside20++;
  if (covers(r.kCI95)) tally.markCovered++;
  if (outside(r.line.k)) tally.lineOutside20++;
  if (covers(r.line.kCI95)) tally.lineCovered++;
  if (outside(r.nonlinear.k)) tally.curveOutside20++;
  if (covers(r.nonlinear.kCI95)) tally.curveCovered++;
  const seen = new Set(r.flags.map((f) => f.code));
  for (const code of seen) tally.flags[code] = (tally.flags[code] ?? 0) + 1;
  if ([...seen].some((c) => c !== "straight-line-bias")) tally.anyFlag++;
}

/** Flags on the exact (noise-free) readings of a scenario. */
export function exactFlags(p: Prepared): FlagCode[] {
  return runFit(p.base).flags.map((f) => f.code);
}

/** The audit grid: every measurement kind, absolute and relative noise, 95-99 % conversion, 0.5-2 % noise. */
export function auditGrid(points = 20): Scenario[] {
  const out: Scenario[] = [];
  const systems: { tag: string; law: RateLaw; nu: number; CA0: number; CB0: number; k: number }[] = [
    { tag: "A+B stoich", law: "second-order-AB", nu: 1, CA0: 0.02, CB0: 0.02, k: 0.11 },
    { tag: "A+B unequal", law: "second-order-AB", nu: 1, CA0: 0.02, CB0: 0.03, k: 0.11 },
    { tag: "A+2B, B limits", law: "second-order-AB", nu: 2, CA0: 0.02, CB0: 0.03, k: 0.11 },
    { tag: "2nd order A", law: "second-order-A", nu: 1, CA0: 0.02, CB0: 0.05, k: 0.11 },
    { tag: "1st order", law: "first-order", nu: 1, CA0: 0.02, CB0: 0.5, k: 1.5e-3 },
  ];
  for (const sys of systems) {
    for (const kind of SIM_KINDS) {
      if (kind === "concentrationB" && sys.law !== "second-order-AB") continue;
      for (const noise of ["absolute", "relative"] as const) {
        for (const [conversion, noisePct] of [
          [0.95, 0.02],
          [0.99, 0.005],
          [0.97, 0.01],
        ] as const) {
          out.push({ name: `${sys.tag}, ${kind}, ${noise} ${noisePct * 100} %, ${conversion * 100} %`, law: sys.law, nu: sys.nu, CA0: sys.CA0, CB0: sys.CB0, k: sys.k, kind, noise, noisePct, conversion, points });
        }
      }
    }
  }
  return out;
}

/** The cases an earlier independent audit quoted (issue figures), to set the old figures beside new ones. */
export function issueCases(points = 20): Scenario[] {
  const ab = { law: "second-order-AB" as RateLaw, nu: 1, CA0: 0.02, CB0: 0.02, k: 0.11 };
  const b2 = { law: "second-order-AB" as RateLaw, nu: 2, CA0: 0.02, CB0: 0.03, k: 0.11 };
  const a2 = { law: "second-order-A" as RateLaw, nu: 1, CA0: 0.02, CB0: 0.05, k: 0.11 };
  const c = (name: string, sys: typeof ab, kind: SimKind, noisePct: number, conversion: number): Scenario => ({ name, ...sys, kind, noise: "absolute", noisePct, conversion, points });
  return [
    c("A+B stoichiometric, 99 %, 0.5 %", ab, "concentrationA", 0.005, 0.99),
    c("second order in A, 95 %, 2 %", a2, "concentrationA", 0.02, 0.95),
    c("conductivity, Sinf known, 97 %, 1 %", ab, "signal", 0.01, 0.97),
    c("A+B stoichiometric, 95 %, 1 %", ab, "concentrationA", 0.01, 0.95),
    c("B limiting (A+2B), 97 % of B, 1 %", b2, "concentrationA", 0.01, 0.97),
    c("B limiting (A+2B), 99 % of B, 1 %", b2, "concentrationA", 0.01, 0.99),
    c("conductivity, Sinf fitted, 80 %, 1 %", ab, "signal-Sinf-fitted", 0.01, 0.8),
    c("conductivity, Sinf fitted, 95 %, 1 %", ab, "signal-Sinf-fitted", 0.01, 0.95),
    c("conductivity, Sinf fitted, 99 %, 1 %", ab, "signal-Sinf-fitted", 0.01, 0.99),
  ];
}
