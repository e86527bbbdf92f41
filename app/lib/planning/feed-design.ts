// The feed designer: proposes one (CA0, CB0, T) per bench and predicts each bench's run with the
// engine's closed forms and k(T) from the Arrhenius reference. Pure, so the JSON check route,
// the pages and the tests run the same code.
import { feedRatio } from "./feed-ratio.ts";
import { concentrationA, lawFromOrders, limitingReagent, rateConstantAt, timeToReach, type Feed, type RateLaw } from "../kinetics";
import { celsiusToKelvin } from "../kinetics/units";
import { mixingVolumes, type MixingVolumes } from "./dilution";

export interface ReactionForDesign {
  coeffA: number;
  coeffB: number;
  orderA: number;
  orderB: number;
  /** per second, mol/L, at TrefC */
  kRef: number;
  TrefC: number;
  EaKJ: number;
}

export interface SessionForDesign {
  slotMinutes: number;
  setupMinutes: number;
  samplingIntervalS: number;
  reactorVolumeMl: number;
  stockAMolL: number;
  stockBMolL: number;
  /** conversion of the limiting reagent to reach, 0-1 */
  targetConversion: number;
}

export interface BenchFeed {
  label: string;
  CA0: number;
  CB0: number;
  temperatureC: number;
}

export interface DesignRequest {
  benchCount: number;
  /** CA0 of every bench, mol/L in the reactor */
  CA0: number;
  /** feed ratio M = CB0 / (nu CA0) */
  ratioMin: number;
  ratioMax: number;
  tempMinC: number;
  tempMaxC: number;
}

export type WarningCode = "slot" | "few-samples" | "volume" | "duplicate";
export interface BenchWarning {
  code: WarningCode;
  message: string;
}

export interface BenchPrediction {
  label: string;
  ratio: number;
  limiting: "A" | "B";
  /** k at the bench's temperature, per second (staff only: do not send to students) */
  kAtT: number;
  minutesToTarget: number;
  volumes: MixingVolumes;
  warnings: BenchWarning[];
  /** predicted CA(t): [minutes, mol/L] */
  curve: Array<[number, number]>;
}

export interface Problem {
  path: string;
  message: string;
}

/** Feeds are made up to 0.1 mmol/L and baths set to 0.5 C (common practice, no source). */
export const CONCENTRATION_STEP = 1e-4;
export const TEMPERATURE_STEP = 0.5;
/** A run should give at least this many samples before it reaches the target (common practice, no source). */
export const MIN_SAMPLES = 8;

const roundTo = (x: number, step: number) => Math.round(x / step) * step;
const clean = (x: number) => Number(x.toPrecision(12));

export function lawOf(reaction: ReactionForDesign): RateLaw {
  const law = lawFromOrders(reaction.orderA, reaction.orderB);
  if (!law) throw new Error(`orders (${reaction.orderA}, ${reaction.orderB}) are not a rate law the engine supports`);
  return law;
}

export function nuOf(reaction: ReactionForDesign): number {
  return reaction.coeffB / reaction.coeffA;
}

/** k (per second) at a bench temperature from the Arrhenius reference. */
export function kAt(reaction: ReactionForDesign, temperatureC: number): number {
  return rateConstantAt(reaction.kRef, celsiusToKelvin(reaction.TrefC), reaction.EaKJ * 1000, celsiusToKelvin(temperatureC));
}

/** CA when the limiting reagent has reached the given conversion. */
export function targetCA(feed: Feed, conversion: number): number {
  return limitingReagent(feed) === "A" ? feed.CA0 * (1 - conversion) : feed.CA0 - (conversion * feed.CB0) / feed.nu;
}

/** Seconds to the target conversion, from the closed form of the reaction's law. */
export function secondsToTarget(reaction: ReactionForDesign, feed: BenchFeed, conversion: number): number {
  const f: Feed = { CA0: feed.CA0, CB0: feed.CB0, nu: nuOf(reaction) };
  return timeToReach(lawOf(reaction), f, kAt(reaction, feed.temperatureC), targetCA(f, conversion));
}

/** Checks in the order a person fixes them: the numbers themselves, then the bench set. */
export function benchProblems(benches: readonly BenchFeed[], prefix = "benches"): Problem[] {
  const problems: Problem[] = [];
  const seen = new Map<string, string>();
  benches.forEach((b, i) => {
    const at = `${prefix}[${i}]`;
    const name = `Bench ${b.label || i + 1}`;
    if (!b.label.trim()) problems.push({ path: `${at}.label`, message: `${name}: give the bench a label.` });
    if (!(b.CA0 > 0)) problems.push({ path: `${at}.CA0`, message: `${name}: CA0 must be above 0 mol/L.` });
    if (!(b.CB0 > 0)) problems.push({ path: `${at}.CB0`, message: `${name}: CB0 must be above 0 mol/L.` });
    if (!(b.temperatureC >= 0 && b.temperatureC <= 100)) problems.push({ path: `${at}.temperatureC`, message: `${name}: the temperature must be between 0 and 100 °C.` });
    const key = `${b.CA0}|${b.CB0}|${b.temperatureC}`;
    const twin = seen.get(key);
    if (twin !== undefined) problems.push({ path: `${at}.CA0`, message: `${name} has the same feed and temperature as bench ${twin}; every bench needs its own.` });
    else seen.set(key, b.label || String(i + 1));
    const labelTwin = benches.findIndex((o) => o.label === b.label);
    if (b.label && labelTwin < i) problems.push({ path: `${at}.label`, message: `${name}: another bench already has this label.` });
  });
  return problems;
}

export function sessionProblems(s: SessionForDesign, prefix = ""): Problem[] {
  const p = (field: string) => (prefix ? `${prefix}.${field}` : field);
  const out: Problem[] = [];
  if (!(s.slotMinutes > 0)) out.push({ path: p("slotMinutes"), message: "The slot must be longer than 0 minutes." });
  if (!(s.setupMinutes >= 0)) out.push({ path: p("setupMinutes"), message: "Set-up time cannot be negative." });
  else if (s.slotMinutes > 0 && s.setupMinutes >= s.slotMinutes) out.push({ path: p("setupMinutes"), message: "Set-up must leave time for the run inside the slot." });
  if (!(s.samplingIntervalS > 0)) out.push({ path: p("samplingIntervalS"), message: "The sampling interval must be longer than 0 s." });
  if (!(s.reactorVolumeMl > 0)) out.push({ path: p("reactorVolumeMl"), message: "The reactor volume must be above 0 mL." });
  if (!(s.stockAMolL > 0)) out.push({ path: p("stockAMolL"), message: "The stock of A must be above 0 mol/L." });
  if (!(s.stockBMolL > 0)) out.push({ path: p("stockBMolL"), message: "The stock of B must be above 0 mol/L." });
  if (!(s.targetConversion > 0 && s.targetConversion < 1)) out.push({ path: p("targetConversion"), message: "The target conversion must be between 0 and 100 % (not either end)." });
  return out;
}

/** Prediction and warnings for one bench. */
export function predictBench(reaction: ReactionForDesign, session: SessionForDesign, bench: BenchFeed): BenchPrediction {
  const nu = nuOf(reaction);
  const feed: Feed = { CA0: bench.CA0, CB0: bench.CB0, nu };
  const law = lawOf(reaction);
  const k = kAt(reaction, bench.temperatureC);
  const seconds = secondsToTarget(reaction, bench, session.targetConversion);
  const minutes = seconds / 60;
  const available = session.slotMinutes - session.setupMinutes;
  const volumes = mixingVolumes(bench, session);
  const warnings: BenchWarning[] = [];
  const pct = Math.round(session.targetConversion * 100);
  if (!Number.isFinite(minutes) || minutes > available) {
    warnings.push({
      code: "slot",
      message: `Needs ${Number.isFinite(minutes) ? minutes.toFixed(0) : "∞"} min to reach ${pct} % conversion; only ${available} min are left after set-up.`,
    });
  }
  if (Number.isFinite(minutes) && seconds < MIN_SAMPLES * session.samplingIntervalS) {
    warnings.push({
      code: "few-samples",
      message: `Reaches ${pct} % in ${minutes.toFixed(1)} min, fewer than ${MIN_SAMPLES} sampling intervals of ${session.samplingIntervalS} s.`,
    });
  }
  if (volumes.waterMl < 0) {
    warnings.push({
      code: "volume",
      message: `Needs ${(volumes.stockAMl + volumes.stockBMl).toFixed(1)} mL of stock, more than the ${session.reactorVolumeMl} mL reactor.`,
    });
  }
  const end = Math.min(Number.isFinite(minutes) ? minutes * 1.25 : available, available) || available;
  const curve: Array<[number, number]> = [];
  for (let i = 0; i <= 40; i++) {
    const tMin = (end * i) / 40;
    curve.push([tMin, concentrationA(law, feed, k, tMin * 60)]);
  }
  return {
    label: bench.label,
    ratio: feedRatio(bench.CA0, bench.CB0, nu),
    limiting: limitingReagent(feed),
    kAtT: k,
    minutesToTarget: minutes,
    volumes,
    warnings,
    curve,
  };
}

function spread(lo: number, hi: number, n: number): number[] {
  if (n === 1) return [(lo + hi) / 2];
  return Array.from({ length: n }, (_, i) => lo + ((hi - lo) * i) / (n - 1));
}

function gcd(a: number, b: number): number {
  return b === 0 ? a : gcd(b, a % b);
}

/**
 * One unique (CA0, CB0, T) per bench: ratios evenly over the range (the level nearest 1 set to
 * exactly 1 when the range holds it, so one bench has the stoichiometric feed), temperatures
 * evenly over theirs in a shuffled order so that ratio and temperature do not rise together.
 */
export function proposeBenches(reaction: ReactionForDesign, req: DesignRequest): { ok: true; benches: BenchFeed[] } | { ok: false; problems: Problem[] } {
  const problems: Problem[] = [];
  const n = req.benchCount;
  if (!Number.isInteger(n) || n < 1 || n > 40) problems.push({ path: "benchCount", message: "Choose between 1 and 40 benches." });
  if (!(req.CA0 > 0)) problems.push({ path: "CA0", message: "CA0 must be above 0 mol/L." });
  if (!(req.ratioMin > 0)) problems.push({ path: "ratioMin", message: "The smallest feed ratio must be above 0." });
  if (!(req.ratioMax >= req.ratioMin)) problems.push({ path: "ratioMax", message: "The largest feed ratio must not be below the smallest." });
  for (const key of ["tempMinC", "tempMaxC"] as const) {
    if (!(req[key] >= 0 && req[key] <= 100)) problems.push({ path: key, message: "Temperatures must be between 0 and 100 °C." });
  }
  if (!problems.length && req.tempMaxC < req.tempMinC) problems.push({ path: "tempMaxC", message: "The highest temperature must not be below the lowest." });
  if (!(reaction.coeffB > 0)) problems.push({ path: "reaction", message: "The feed ratio needs B to take part (b above 0)." });
  if (problems.length) return { ok: false, problems };

  const nu = nuOf(reaction);
  const ratioSpan = req.ratioMax - req.ratioMin;
  const tempSpan = req.tempMaxC - req.tempMinC;
  const nRatio = ratioSpan > 0 ? n : 1;
  const nTemp = tempSpan > 0 ? n : 1;
  const ratios = spread(req.ratioMin, req.ratioMax, nRatio);
  if (req.ratioMin <= 1 && req.ratioMax >= 1 && nRatio > 1) {
    let best = 0;
    ratios.forEach((r, i) => (Math.abs(r - 1) < Math.abs(ratios[best] - 1) ? (best = i) : null));
    ratios[best] = 1;
  }
  const temps = spread(req.tempMinC, req.tempMaxC, nTemp);
  // a step coprime with n visits every temperature once, in a scrambled order
  let step = Math.max(1, Math.round(n * 0.618));
  while (gcd(step, n) !== 1) step++;

  const benches: BenchFeed[] = [];
  for (let i = 0; i < n; i++) {
    const ratio = ratios[nRatio === 1 ? 0 : i];
    const T = temps[nTemp === 1 ? 0 : (i * step) % n];
    benches.push({
      label: String(i + 1),
      CA0: clean(roundTo(req.CA0, CONCENTRATION_STEP)),
      CB0: clean(roundTo(ratio * nu * req.CA0, CONCENTRATION_STEP)),
      temperatureC: clean(roundTo(T, TEMPERATURE_STEP)),
    });
  }
  const dupes = benchProblems(benches).filter((p) => p.message.includes("same feed"));
  if (dupes.length || (n > 1 && ratioSpan === 0 && tempSpan === 0)) {
    return {
      ok: false,
      problems: [
        {
          path: "ratioMax",
          message:
            `Feed ratios ${req.ratioMin}–${req.ratioMax} and temperatures ${req.tempMinC}–${req.tempMaxC} °C cannot give ${n} different benches ` +
            `(feeds are set to 0.1 mmol/L, temperatures to 0.5 °C). Widen a range or use fewer benches.`,
        },
      ],
    };
  }
  return { ok: true, benches };
}
