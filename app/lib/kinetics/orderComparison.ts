// Which rate law describes the readings: every law the feed allows is fitted to the same rows
// with the same weights, and compared by Akaike's information criterion. All laws have the same
// number of parameters, so AIC_i - AIC_best = n ln(SSE_i / SSE_best). A law is "decidedly"
// worse when it trails the best by DECIDED_DELTA or more (Burnham and Anderson, Model Selection
// and Multimodel Inference, 2nd ed., 2002, section 2.6: a difference above 10 leaves essentially
// no support; from memory). Several laws within that of the best: "cannot tell".
// Laws that are the same function of time for this feed are one entry: second order in A and
// first order in A and B with a stoichiometric feed (CB = nu CA), and first order in A and B
// when B is not consumed (nu = 0: pseudo-first order).

import { RATE_LAWS, isStoichiometric, modelName, rateConstantUnit, type Feed, type ModelName, type RateLaw } from "./rateLaws.ts";

export const DECIDED_DELTA = 10;

export interface LawComparison {
  model: ModelName;
  /** laws that give this same curve for this feed (the entry stands for all of them) */
  equivalent: ModelName[];
  k: number;
  kUnit: "1/s" | "L/(mol*s)";
  kStdErr: number;
  /** residual sum of squares of the curve fit, in the measured quantity's units squared */
  sse: number;
  /** residual sum of squares weighted by the noise model, what the criterion compares */
  weightedSse: number;
  /** residual standard deviation of the curve fit, measured units */
  residualStdDev: number;
  /** AIC of this law minus the best one's (0 for the best) */
  deltaAIC: number;
  /** whether the runs test finds systematic bending for this law */
  curved: boolean;
}

export interface OrderComparison {
  /** smallest weighted residual sum of squares */
  best: ModelName;
  /** "requested": the law asked for is the only one supported; "other": another law is decidedly better; "cannot-tell": several laws fit about as well */
  verdict: "requested" | "other" | "cannot-tell";
  /** laws within DECIDED_DELTA of the best */
  supported: ModelName[];
  criterion: "AIC";
  threshold: number;
  laws: LawComparison[];
  /** rows compared (every row, or evenly spaced ones on long records) */
  points: number;
}

/** Laws to fit for this feed, each with the others it stands for. */
export function candidateLaws(feed: Feed): { law: RateLaw; equivalent: RateLaw[] }[] {
  const out: { law: RateLaw; equivalent: RateLaw[] }[] = [];
  for (const law of RATE_LAWS) {
    if (law === "second-order-AB") {
      if (!(feed.CB0 > 0)) continue; // the A-B law needs some B
      if (feed.nu === 0) {
        out.find((c) => c.law === "first-order")!.equivalent.push(law);
        continue;
      }
      if (isStoichiometric(feed)) {
        out.find((c) => c.law === "second-order-A")!.equivalent.push(law);
        continue;
      }
    }
    out.push({ law, equivalent: [] });
  }
  return out;
}

/** Which candidate stands for the requested law. */
export function representative(requested: RateLaw, feed: Feed): RateLaw {
  for (const c of candidateLaws(feed)) if (c.law === requested || c.equivalent.includes(requested)) return c.law;
  return requested;
}

export interface FittedCandidate {
  law: RateLaw;
  equivalent: RateLaw[];
  k: number;
  kStdErr: number;
  sse: number;
  weightedSse: number;
  residualStdDev: number;
  curved: boolean;
}

/**
 * Compares fitted candidates. `floor` is a weighted SSE below which differences are rounding
 * (exact data), added to every SSE so that two exact fits never look different.
 */
export function compare(requested: RateLaw, feed: Feed, fits: FittedCandidate[], n: number, floor: number): OrderComparison {
  let min = Infinity;
  for (const f of fits) min = Math.min(min, f.weightedSse);
  const laws: LawComparison[] = fits.map((f) => {
    const entryLaw = f.equivalent.includes(requested) ? requested : f.law;
    // k of the entry is on A for the law named; equivalent laws differ only by the factor nu
    const k = entryLaw === f.law ? f.k : convertK(f.law, entryLaw, f.k, feed);
    const seScale = entryLaw === f.law ? 1 : convertK(f.law, entryLaw, 1, feed);
    return {
      model: modelName(entryLaw, feed),
      equivalent: [f.law, ...f.equivalent].filter((l) => l !== entryLaw).map((l) => modelName(l, feed)),
      k,
      kUnit: rateConstantUnit(entryLaw),
      kStdErr: f.kStdErr * seScale,
      sse: f.sse,
      weightedSse: f.weightedSse,
      residualStdDev: f.residualStdDev,
      deltaAIC: n * Math.log((f.weightedSse + floor) / (min + floor)),
      curved: f.curved,
    };
  });
  const bestEntry = laws.reduce((a, b) => (b.weightedSse < a.weightedSse ? b : a), laws[0]);
  const supported = laws.filter((l) => l.deltaAIC < DECIDED_DELTA).map((l) => l.model);
  const asked = modelName(requested, feed);
  const verdict = !supported.includes(asked) ? "other" : supported.length === 1 ? "requested" : "cannot-tell";
  return { best: bestEntry.model, verdict, supported, criterion: "AIC", threshold: DECIDED_DELTA, laws, points: n };
}

/** k of an equivalent law: stoichiometric A-B k = k2A / nu; nu = 0: A-B k = k1 / CB0. */
function convertK(from: RateLaw, to: RateLaw, k: number, feed: Feed): number {
  if (from === to) return k;
  if (from === "second-order-A" && to === "second-order-AB") return k / feed.nu;
  if (from === "first-order" && to === "second-order-AB") return k / feed.CB0;
  return k;
}
