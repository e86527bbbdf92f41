import { describe, expect, it } from "vitest";
import {
  RATE_LAWS,
  concentrationA,
  concentrationASensitivity,
  excessOfB,
  finalCA,
  lineY,
  modelName,
  textbookLine,
  timeToReach,
  type Feed,
  type RateLaw,
} from "./rateLaws.ts";
import { fitLine } from "./linearFit.ts";

// odex ships its TypeScript source, which does not compile under this project's strict
// settings; load it untyped (the specifier is not a literal, so tsc does not follow it) and
// describe the part used here.
interface OdexSolver {
  relativeTolerance: number;
  absoluteTolerance: number;
  maxSteps: number;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], xEnd: number): { y: number[]; outcome: number };
}
const odexName: string = "odex";
const { Solver } = (await import(/* @vite-ignore */ odexName)) as { Solver: new (n: number) => OdexSolver };

const ORDERS: Record<RateLaw, [number, number]> = {
  "first-order": [1, 0],
  "second-order-A": [2, 0],
  "second-order-AB": [1, 1],
};

/**
 * Independent reference: integrate dCA/dt = -r, dCB/dt = -nu r, r = k CA^alpha CB^beta
 * (B carried as its own species, not through the stoichiometric substitution) and, for the
 * Jacobian, the forward sensitivities S = dC/dk, with the odex Gragg-Bulirsch-Stoer integrator.
 */
function integrate(law: RateLaw, feed: Feed, k: number, t: number): { CA: number; CB: number; dCAdk: number } {
  const [alpha, beta] = ORDERS[law];
  const solver = new Solver(4);
  solver.relativeTolerance = 1e-14;
  solver.absoluteTolerance = 1e-20;
  solver.maxSteps = 100000;
  const rhs = (_x: number, y: number[]) => {
    const [a, b, sa, sb] = y;
    const r = k * a ** alpha * b ** beta;
    // dr/dk = r/k; dr/dCA = alpha r/CA; dr/dCB = beta r/CB (written to stay finite at beta = 0)
    const drdk = a ** alpha * b ** beta;
    const drda = alpha * k * a ** (alpha - 1) * b ** beta;
    const drdb = beta === 0 ? 0 : beta * k * a ** alpha * b ** (beta - 1);
    const ds = drdk + drda * sa + drdb * sb;
    return [-r, -feed.nu * r, -ds, -feed.nu * ds];
  };
  if (t === 0) return { CA: feed.CA0, CB: feed.CB0, dCAdk: 0 };
  const out = solver.solve(rhs, 0, [feed.CA0, feed.CB0, 0, 0], t);
  expect(out.outcome).toBe(0);
  return { CA: out.y[0], CB: out.y[1], dCAdk: out.y[2] };
}

const CA0 = 0.02;
// Feeds on both sides of stoichiometric (CB0 / (nu CA0) below and above 1), and right at it.
const FEEDS: Feed[] = [];
for (const nu of [1, 2, 0.5]) {
  for (const ratio of [0.5, 0.9, 0.999, 1, 1.001, 1.1, 2, 10]) FEEDS.push({ CA0, CB0: ratio * nu * CA0, nu });
}

/** Times reaching about 1 %, 30 %, 70 % and 95 % of the way to the long-time value, for k = 0.1 L/(mol s) (or 1/s x CB0). */
function times(law: RateLaw, feed: Feed, k: number): number[] {
  const end = law === "second-order-AB" ? finalCA(feed) : 0;
  const out: number[] = [];
  for (const fraction of [0.01, 0.3, 0.7, 0.95]) {
    const target = feed.CA0 - fraction * (feed.CA0 - end);
    // bisection on the closed form only picks sample times; the check itself is against odex
    let lo = 0;
    let hi = 1;
    while (concentrationA(law, feed, k, hi) > target) hi *= 2;
    for (let i = 0; i < 80; i++) {
      const mid = (lo + hi) / 2;
      if (concentrationA(law, feed, k, mid) > target) lo = mid;
      else hi = mid;
    }
    out.push(hi);
  }
  return out;
}

describe("closed-form CA(t) against numerical integration (odex)", () => {
  for (const law of RATE_LAWS) {
    it(`${law}: CA(t) and dCA/dk agree with odex to 1e-8 relative over ${FEEDS.length} feeds`, () => {
      const k = law === "first-order" ? 1e-3 : 0.1;
      let worst = 0;
      let worstSens = 0;
      for (const feed of FEEDS) {
        for (const t of times(law, feed, k)) {
          const ref = integrate(law, feed, k, t);
          const ca = concentrationA(law, feed, k, t);
          worst = Math.max(worst, Math.abs(ca - ref.CA) / ref.CA);
          const s = concentrationASensitivity(law, feed, k, t);
          worstSens = Math.max(worstSens, Math.abs(s - ref.dCAdk) / Math.abs(ref.dCAdk));
        }
      }
      expect(worst).toBeLessThan(1e-8);
      expect(worstSens).toBeLessThan(1e-8);
    });
  }

  it("A-B law with B limiting: CA levels off at CA0 - CB0/nu (odex at a long time)", () => {
    const feed: Feed = { CA0, CB0: 0.6 * 2 * CA0, nu: 2 };
    const k = 0.1;
    const t = 5e5;
    const ref = integrate("second-order-AB", feed, k, t);
    const expected = CA0 - feed.CB0 / feed.nu;
    expect(Math.abs(ref.CA - expected) / expected).toBeLessThan(1e-6);
    expect(Math.abs(concentrationA("second-order-AB", feed, k, t) - expected) / expected).toBeLessThan(1e-6);
    expect(finalCA(feed)).toBeCloseTo(expected, 15);
  });
});

describe("time to reach a concentration (for designing runs)", () => {
  for (const law of RATE_LAWS) {
    it(`${law}: inverts the odex solution to 1e-8`, () => {
      const k = law === "first-order" ? 1e-3 : 0.1;
      for (const feed of [FEEDS[1], FEEDS[11], FEEDS[20]]) {
        for (const t of [30, 600, 3000]) {
          const CA = integrate(law, feed, k, t).CA;
          expect(Math.abs(timeToReach(law, feed, k, CA) - t) / t).toBeLessThan(1e-8);
        }
      }
    });
  }
});

describe("textbook integrated forms for bimolecular second-order reactions", () => {
  // Levenspiel, Chemical Reaction Engineering, 3rd ed., ch. 3, irreversible bimolecular
  // second-order reactions (from memory; see shared/reference/kinetics-literature.md):
  //   M = CB0/CA0 != b: ln[(M - b XA)/(M (1 - XA))] = CA0 (M - b) k t
  //   M = b:            1/CA - 1/CA0 = b k t
  const k = 0.1;
  for (const [b, M] of [
    [1, 2],
    [1, 0.5],
    [2, 1],
    [2, 3],
  ]) {
    it(`unequal feed, b = ${b}, M = ${M}: the closed form satisfies the textbook expression`, () => {
      const feed: Feed = { CA0, CB0: M * CA0, nu: b };
      expect(modelName("second-order-AB", feed)).toBe("second-order-AB-unequal");
      for (const t of [10, 100, 1000, 5000]) {
        const CA = concentrationA("second-order-AB", feed, k, t);
        const XA = 1 - CA / CA0;
        const lhs = Math.log((M - b * XA) / (M * (1 - XA)));
        const rhs = CA0 * (M - b) * k * t;
        expect(Math.abs(lhs - rhs)).toBeLessThan(1e-12 * Math.max(1, Math.abs(rhs)));
        // the engine's scaled straight-line value equals the textbook y divided by its factor
        const line = textbookLine("second-order-AB", feed);
        expect(line.factor).toBeCloseTo(CA0 * (M - b), 15);
        expect(Math.abs(lineY("second-order-AB", feed, CA) * line.factor - lhs)).toBeLessThan(1e-12 * Math.max(1, Math.abs(lhs)));
      }
    });
  }

  for (const b of [1, 2]) {
    it(`stoichiometric feed, b = ${b}: 1/CA - 1/CA0 = b k t`, () => {
      const feed: Feed = { CA0, CB0: b * CA0, nu: b };
      expect(modelName("second-order-AB", feed)).toBe("second-order-AB-stoichiometric");
      expect(textbookLine("second-order-AB", feed)).toEqual({ y: "1/CA - 1/CA0", factor: b });
      for (const t of [10, 100, 1000, 5000]) {
        const CA = concentrationA("second-order-AB", feed, k, t);
        expect(1 / CA - 1 / CA0).toBeCloseTo(b * k * t, 10);
        expect(lineY("second-order-AB", feed, CA)).toBeCloseTo(k * t, 10);
      }
    });
  }
});

describe("facts of the trade (common practice, no source)", () => {
  it("A + 2B with equal initial concentrations: CA tends to CA0/2, and the integrated expression is zero at t = 0", () => {
    const feed: Feed = { CA0, CB0: CA0, nu: 2 };
    const k = 0.1;
    expect(finalCA(feed)).toBe(CA0 / 2);
    const late = concentrationA("second-order-AB", feed, k, 1e7);
    expect(Math.abs(late - CA0 / 2) / (CA0 / 2)).toBeLessThan(1e-12);
    // ln[(CB CA0)/(CB0 CA)] at t = 0, where CA = CA0 and CB = CB0
    expect(Math.log((feed.CB0 * CA0) / (feed.CB0 * CA0))).toBe(0);
    expect(lineY("second-order-AB", feed, CA0)).toBe(0);
    expect(concentrationA("second-order-AB", feed, k, 0)).toBe(CA0);
  });

  it("stoichiometric feed: 1/CA from odex rises linearly with time, slope nu k", () => {
    const feed: Feed = { CA0, CB0: 2 * CA0, nu: 2 };
    const k = 0.1;
    const t = Array.from({ length: 11 }, (_, i) => i * 500);
    const inverse = t.map((ti) => 1 / integrate("second-order-AB", feed, k, ti).CA);
    const line = fitLine(t, inverse);
    expect(1 - line.r2).toBeLessThan(1e-13);
    expect(line.slope / (feed.nu * k)).toBeCloseTo(1, 10);
    expect(line.intercept).toBeCloseTo(1 / CA0, 8);
  });

  it("first order: the half-life ln 2 / k does not depend on CA0", () => {
    const k = 2e-3;
    for (const c0 of [0.001, 0.02, 1]) {
      const feed: Feed = { CA0: c0, CB0: 1, nu: 1 };
      expect(concentrationA("first-order", feed, k, Math.LN2 / k) / c0).toBeCloseTo(0.5, 14);
    }
  });
});

describe("numerical soundness near a stoichiometric feed", () => {
  const k = 0.1;
  const base: Feed = { CA0, CB0: 2 * CA0, nu: 2 };
  const t = [1, 100, 1000, 1e4, 1e5];

  it("CA(t) and the straight-line value are continuous through D = CB0 - nu CA0 = 0", () => {
    const shifted = (eps: number): Feed => ({ ...base, CB0: base.CB0 * (1 + eps) });
    for (const ti of t) {
      const c0 = concentrationA("second-order-AB", base, k, ti);
      const y0 = lineY("second-order-AB", base, c0);
      // sensitivity to the feed mismatch, measured at eps = 1e-6 on each side
      const slopeC = Math.max(
        ...[-1e-6, 1e-6].map((e) => Math.abs(concentrationA("second-order-AB", shifted(e), k, ti) - c0) / (c0 * 1e-6)),
      );
      const slopeY = Math.max(...[-1e-6, 1e-6].map((e) => Math.abs(lineY("second-order-AB", shifted(e), c0) - y0) / (y0 * 1e-6)));
      for (const eps of [-1e-7, -1e-9, -1e-12, -1e-15, 1e-15, 1e-12, 1e-9, 1e-7]) {
        const feed = shifted(eps);
        expect(Math.sign(excessOfB(feed))).toBe(Math.sign(eps));
        // the change shrinks in proportion to the mismatch, down to rounding: no loss of digits as eps -> 0
        const c = concentrationA("second-order-AB", feed, k, ti);
        expect(Math.abs(c - c0) / c0).toBeLessThanOrEqual(2 * slopeC * Math.abs(eps) + 1e-14);
        const y = lineY("second-order-AB", feed, c0);
        expect(Math.abs(y - y0) / y0).toBeLessThanOrEqual(2 * slopeY * Math.abs(eps) + 1e-14);
      }
    }
  });

  it("a nearly stoichiometric feed still matches odex to 1e-8 where the naive log form fails", () => {
    const feed: Feed = { ...base, CB0: base.CB0 * (1 + 1e-12) };
    const ti = 1e4;
    const ref = integrate("second-order-AB", feed, k, ti);
    const ca = concentrationA("second-order-AB", feed, k, ti);
    expect(Math.abs(ca - ref.CA) / ref.CA).toBeLessThan(1e-8);
    const D = excessOfB(feed);
    const CB = feed.CB0 - feed.nu * (feed.CA0 - ca);
    const naive = Math.log((CB * feed.CA0) / (feed.CB0 * ca)) / D;
    const stable = lineY("second-order-AB", feed, ca);
    expect(Math.abs(stable - k * ti) / (k * ti)).toBeLessThan(1e-9);
    // shows why: dividing two vanishing numbers loses most of the digits
    expect(Math.abs(naive - k * ti) / (k * ti)).toBeGreaterThan(1e-6);
  });

  it("CA and dCA/dk stay finite for very long times on either side", () => {
    for (const eps of [-0.5, 0.5]) {
      const feed: Feed = { ...base, CB0: base.CB0 * (1 + eps) };
      for (const ti of [1e6, 1e9, 1e12]) {
        const c = concentrationA("second-order-AB", feed, k, ti);
        const s = concentrationASensitivity("second-order-AB", feed, k, ti);
        expect(Number.isFinite(c) && Number.isFinite(s)).toBe(true);
        expect(c).toBeCloseTo(finalCA(feed), 12);
      }
    }
  });
});
