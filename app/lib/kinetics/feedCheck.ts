// Readings that cannot come from the stated feed. Every reading is put on one scale, the
// fraction of the limiting reagent reacted, p = (CA0 - CA)/(CA0 - CA_final): 0 at the start,
// 1 at the long-time limit the feed allows. Honest readings stay within noise of [0, 1];
// a reading before the start or past the end, or a first reading (taken at the start) that is
// already far along, means the readings and the feed disagree.

import { toCA, type AffineMap, type Measurement } from "./measurement.ts";
import { maxReactedA, type Feed } from "./rateLaws.ts";

// Thresholds (rules of this engine): beyond SIGMAS noise standard deviations and beyond
// FLOOR of the full change (so rounding on exact data never counts).
export const FEED_SIGMAS = 5;
export const FEED_FLOOR = 0.02;
/** a first reading this far along, taken in the first EARLY share of the run, was not at the start */
export const FIRST_READING_FAR = 0.5;
export const EARLY = 0.05;

export interface FeedFinding {
  /** the reading over the feed value, on the measured quantity's own zero; NaN when it has none */
  factor: number;
  rows: number[];
  message: string;
}

export interface FeedCheckInput {
  feed: Feed;
  measurement: Measurement;
  map: AffineMap;
  /** whether the long-time limit is known (false when Sinf was fitted) */
  endKnown: boolean;
  t: ArrayLike<number>;
  values: ArrayLike<number>;
  /** noise sd of each reading, measured units */
  sd: ArrayLike<number>;
  /** feed value text for the message, e.g. "CA0 = 0.02 mol/L" */
  feedText: string;
  concentrationUnit: string;
}

export function checkFeed(input: FeedCheckInput): FeedFinding | null {
  const { feed, measurement, map, t, values, sd } = input;
  const n = t.length;
  if (n < 3) return null;
  const span = Math.abs(map.slope * maxReactedA(feed));
  if (!(span > 0)) return null;
  const progress = (i: number) => (feed.CA0 - toCA(map, values[i])) / maxReactedA(feed);
  const band = (i: number) => Math.max((FEED_SIGMAS * sd[i]) / span, FEED_FLOOR);
  let first = 0;
  let last = 0;
  for (let i = 1; i < n; i++) {
    if (t[i] < t[first]) first = i;
    if (t[i] > t[last]) last = i;
  }
  const before: number[] = [];
  const past: number[] = [];
  for (let i = 0; i < n; i++) {
    const p = progress(i);
    if (p < -band(i)) before.push(i);
    else if (input.endKnown && p > 1 + band(i)) past.push(i);
  }
  const zero = naturalZero(measurement, feed, map);
  const feedValue = map.offset + map.slope * feed.CA0;
  const factorOf = (i: number) => (zero === null ? NaN : (values[i] - zero) / (feedValue - zero));
  if (before.length > 0) {
    const worst = before.reduce((a, i) => (progress(i) < progress(a) ? i : a), before[0]);
    const factor = factorOf(worst);
    return {
      factor,
      rows: before,
      message: `${before.length} reading(s) lie beyond the starting value the feed gives (${input.feedText}), by more than the noise allows${Number.isFinite(factor) ? `: the farthest is ${formatFactor(factor)} times the feed value` : ""}. ${likelyCause(factor, input.concentrationUnit)}`,
    };
  }
  const pFirst = progress(first);
  if (pFirst > FIRST_READING_FAR && t[first] - 0 <= EARLY * (t[last] || 1)) {
    const factor = factorOf(first);
    return {
      factor,
      rows: [first],
      message: `The first reading, at the start of the run, already corresponds to ${(pFirst * 100).toFixed(0)} % of the limiting reagent reacted under the stated feed (${input.feedText})${Number.isFinite(factor) ? `: it is ${formatFactor(factor)} times the feed value` : ""}. ${likelyCause(factor, input.concentrationUnit)}`,
    };
  }
  if (past.length >= 2) {
    return {
      factor: NaN,
      rows: past,
      message: `${past.length} readings go past the long-time limit the stated feed allows (${input.feedText}) by more than the noise allows: the feed (CA0, CB0 or the coefficients) does not match the readings, or the readings and the feed are in different units.`,
    };
  }
  return null;
}

/** Measured value that means "no species": 0 for concentrations, the baseline for absorbance. */
function naturalZero(m: Measurement, feed: Feed, map: AffineMap): number | null {
  switch (m.kind) {
    case "concentrationA":
      return 0;
    case "concentrationB":
      return feed.nu > 0 ? 0 : null;
    case "absorbance":
      return m.baseline ?? 0;
    default:
      void map;
      return null;
  }
}

export function formatFactor(f: number): string {
  if (!Number.isFinite(f)) return "?";
  return f >= 1 ? Number(f.toPrecision(3)).toString() : `1/${Number((1 / f).toPrecision(3))}`;
}

/** The likely cause for a factor between readings and feed (common practice, no source). */
export function likelyCause(factor: number, concentrationUnit: string): string {
  const near = (x: number, target: number, band: number) => Math.abs(Math.log(x / target)) <= Math.log(band);
  if (Number.isFinite(factor) && factor > 0) {
    if (near(factor, 1000, 1.5)) {
      return `A factor near 1000: the readings look like mmol/L while the feed reads as mol/L. units.concentration (${concentrationUnit}) applies to the feed and the readings alike.`;
    }
    if (near(factor, 1 / 1000, 1.5)) {
      return `A factor near 1/1000: the readings look like mol/L while the feed reads as mmol/L. units.concentration (${concentrationUnit}) applies to the feed and the readings alike.`;
    }
    if (near(factor, 2, 1.15) || near(factor, 0.5, 1.15)) {
      return "A factor near 2: a feed given before mixing equal volumes (or after), or a stoichiometric coefficient; check the feed.";
    }
  }
  return "Check the feed concentrations as typed, and how the solutions were made up.";
}
