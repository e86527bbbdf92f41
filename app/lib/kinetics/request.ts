// The fit request (JSON in, as sent by the command line or an API route) and its validation.
// Validation collects every problem with the path where it is, rather than stopping at the first.

import { lawFromOrders } from "./rateLaws.ts";
import { MEASUREMENT_KINDS, type Measurement } from "./measurement.ts";
import { NOISE_CHOICES, type NoiseChoice } from "./noise.ts";
import { CONCENTRATION_UNITS, TIME_UNITS, ZERO_CELSIUS_K, molPerLitrePer, secondsPer, type ConcentrationUnit, type TimeUnit } from "./units.ts";

export interface FitRequest {
  /** a A + b B -> products, -dCA/dt = k CA^orderA CB^orderB */
  reaction: { a: number; b: number; orderA: number; orderB: number };
  /** initial concentrations in units.concentration; CB0 may be left out only when b = 0 and orderB = 0 */
  feed: { CA0: number; CB0?: number };
  units: { time: TimeUnit; concentration: ConcentrationUnit };
  /** concentrations in units.concentration; signal in its own units; absorbance dimensionless */
  measurement: Measurement;
  /** [time, measured value] pairs */
  points: [number, number][];
  temperatureC?: number;
  /**
   * Expected k, always per second with concentrations in mol/L (1/s or L/(mol s)),
   * whatever units the points use. EaKJ omitted: k taken as independent of temperature.
   */
  reference?: {
    k: number;
    TrefC?: number;
    EaKJ?: number;
    tolerancePct?: number;
    /**
     * What the reference k is defined on: "A" (default), -dCA/dt = k CA^orderA CB^orderB, or
     * "reaction", the rate of reaction -(1/a) dCA/dt = k ..., so k on A = a k on the reaction.
     */
    definedOn?: "A" | "reaction";
  };
  options?: {
    /**
     * How the readings err: "absolute" (same sd on every reading), "relative" (sd proportional to
     * the reading; for a conversion, to 1 - X), or "estimate" (default: the likelier of the two
     * under the residuals of an unweighted curve fit).
     */
    noise?: NoiseChoice;
    /** fit the straight line through the origin instead of with a free intercept (default false) */
    lineThroughOrigin?: boolean;
    /** also fit the other supported rate laws and report which describes the data best (default true) */
    compareOrders?: boolean;
    /**
     * a signal's S0 is a parameter of the curve fit, not `measurement.S0` (which only has to be a
     * number): the clock started at mixing and the first reading came later (default false)
     */
    fitSignalStart?: boolean;
  };
}

export interface FieldError {
  path: string;
  message: string;
}

export type ValidationResult = { ok: true; request: FitRequest } | { ok: false; errors: FieldError[] };

type Obj = Record<string, unknown>;

const isObject = (v: unknown): v is Obj => typeof v === "object" && v !== null && !Array.isArray(v);
const isNumber = (v: unknown): v is number => typeof v === "number" && Number.isFinite(v);

class Collector {
  errors: FieldError[] = [];
  add(path: string, message: string) {
    this.errors.push({ path, message });
  }
  /** Object at path, or null (with an error) when it is not one. */
  object(v: unknown, path: string, allowed: readonly string[]): Obj | null {
    if (!isObject(v)) {
      this.add(path, v === undefined ? "is required" : "must be an object");
      return null;
    }
    for (const key of Object.keys(v)) {
      if (!allowed.includes(key)) this.add(join(path, key), `unknown field (expected one of: ${allowed.join(", ")})`);
    }
    return v;
  }
  /** A finite number meeting `test`, or undefined (with an error). Absent is an error only if required. */
  number(obj: Obj, key: string, path: string, required: boolean, test?: [(x: number) => boolean, string]): number | undefined {
    const v = obj[key];
    const where = join(path, key);
    if (v === undefined) {
      if (required) this.add(where, "is required");
      return undefined;
    }
    if (!isNumber(v)) {
      this.add(where, describeNonNumber(v));
      return undefined;
    }
    if (test && !test[0](v)) {
      this.add(where, test[1]);
      return undefined;
    }
    return v;
  }
}

function join(path: string, key: string | number): string {
  if (typeof key === "number") return `${path}[${key}]`;
  return path ? `${path}.${key}` : key;
}

function describeNonNumber(v: unknown): string {
  if (typeof v === "number") return "must be a finite number (got NaN or infinity)";
  if (typeof v === "string") return `must be a number, not the text "${v.slice(0, 20)}"`;
  return `must be a number (got ${v === null ? "null" : Array.isArray(v) ? "an array" : typeof v})`;
}

const positive: [(x: number) => boolean, string] = [(x) => x > 0, "must be greater than zero"];
const nonNegative: [(x: number) => boolean, string] = [(x) => x >= 0, "must not be negative"];
const aboveAbsoluteZero: [(x: number) => boolean, string] = [(x) => x > -ZERO_CELSIUS_K, "must be above absolute zero (-273.15 C)"];
// Ranges past which a number is a slip, not a measurement (common practice, no source).
const MAX_TEMPERATURE_C = 500;
const MAX_CONCENTRATION_MOL_L = 25; // pure water is about 55 mol/L; no reacting solution comes near
const MAX_TIME_S = 1e8; // about three years
const MAX_ABSORBANCE = 6; // no spectrometer reads far above about 4
const MAX_READING = 1e12;
const MAX_EA_KJ = 1000;
const MAX_K = 1e15;
/** slightly negative concentrations and conversions are noise around zero; beyond this share of the feed they are errors */
const NEGATIVE_NOISE_SHARE = 0.05;
const temperatureRange: [(x: number) => boolean, string] = [
  (x) => x > -ZERO_CELSIUS_K && x <= MAX_TEMPERATURE_C,
  `must be above absolute zero (-273.15 C) and at most ${MAX_TEMPERATURE_C} C (degrees Celsius, not kelvin)`,
];

export function validateFitRequest(json: unknown): ValidationResult {
  const c = new Collector();
  const root = c.object(json, "", [
    "reaction",
    "feed",
    "units",
    "measurement",
    "points",
    "temperatureC",
    "reference",
    "options",
  ]);
  if (!root) return { ok: false, errors: c.errors };

  // reaction
  let b: number | undefined;
  let orderB: number | undefined;
  const reaction = c.object(root.reaction, "reaction", ["a", "b", "orderA", "orderB"]);
  if (reaction) {
    c.number(reaction, "a", "reaction", true, positive);
    b = c.number(reaction, "b", "reaction", true, nonNegative);
    const orderA = c.number(reaction, "orderA", "reaction", true);
    orderB = c.number(reaction, "orderB", "reaction", true);
    if (orderA !== undefined && orderB !== undefined && lawFromOrders(orderA, orderB) === null) {
      c.add(
        "reaction",
        `orders (orderA ${orderA}, orderB ${orderB}) are not supported: use (1, 0) first order or pseudo-first order, (2, 0) second order in A, or (1, 1) first order in each`,
      );
    }
  }

  // measurement (before the feed, which needs to know whether B is measured)
  let measuresB = false;
  let concentrationMeasured = false;
  const m = root.measurement;
  if (!isObject(m)) c.add("measurement", m === undefined ? "is required" : "must be an object");
  else if (typeof m.kind !== "string" || !(MEASUREMENT_KINDS as readonly string[]).includes(m.kind)) {
    c.add("measurement.kind", `unknown kind ${JSON.stringify(m.kind)}: use one of ${MEASUREMENT_KINDS.join(", ")}`);
  } else {
    switch (m.kind) {
      case "concentrationA":
      case "conversionA":
        c.object(m, "measurement", ["kind"]);
        concentrationMeasured = m.kind === "concentrationA";
        break;
      case "concentrationB":
        c.object(m, "measurement", ["kind"]);
        concentrationMeasured = true;
        measuresB = true;
        break;
      case "signal": {
        c.object(m, "measurement", ["kind", "S0", "Sinf"]);
        const S0 = c.number(m, "S0", "measurement", true);
        const Sinf = c.number(m, "Sinf", "measurement", false);
        if (S0 !== undefined && Sinf !== undefined && S0 === Sinf) {
          c.add("measurement.Sinf", "must differ from S0: the signal has to change as the reaction goes");
        }
        break;
      }
      case "absorbance":
        c.object(m, "measurement", ["kind", "species", "epsilon", "pathCm", "baseline"]);
        if (m.species !== "A" && m.species !== "B") c.add("measurement.species", 'must be "A" or "B"');
        measuresB = m.species === "B";
        c.number(m, "epsilon", "measurement", true, positive);
        c.number(m, "pathCm", "measurement", true, positive);
        c.number(m, "baseline", "measurement", false);
        break;
    }
    if (measuresB && b === 0) {
      c.add("measurement", "B is not consumed when b = 0, so measuring B says nothing about A");
    }
  }

  // feed
  // units (before the feed and points, whose ranges depend on them)
  const units = c.object(root.units, "units", ["time", "concentration"]);
  let timeScale = 1;
  let concentrationScale = 1;
  if (units) {
    if (!(TIME_UNITS as readonly unknown[]).includes(units.time)) {
      c.add("units.time", `must be one of ${TIME_UNITS.join(", ")}`);
    } else timeScale = secondsPer(units.time as TimeUnit);
    if (!(CONCENTRATION_UNITS as readonly unknown[]).includes(units.concentration)) {
      c.add("units.concentration", `must be one of ${CONCENTRATION_UNITS.join(", ")}`);
    } else concentrationScale = molPerLitrePer(units.concentration as ConcentrationUnit);
  }
  const unitText = typeof units?.concentration === "string" ? units.concentration : "the concentration unit";
  const maxConcentration = MAX_CONCENTRATION_MOL_L / concentrationScale;
  const concentrationRange: [(x: number) => boolean, string] = [
    (x) => x <= maxConcentration,
    `is more than ${MAX_CONCENTRATION_MOL_L} mol/L, which no reacting solution holds: check the value and units.concentration (${unitText}), which applies to the feed and the readings alike`,
  ];

  const feed = c.object(root.feed, "feed", ["CA0", "CB0"]);
  let CA0: number | undefined;
  let CB0: number | undefined;
  if (feed) {
    CA0 = c.number(feed, "CA0", "feed", true, [(x) => x > 0, "must be greater than zero: a feed of zero cannot react"]);
    if (CA0 !== undefined && !concentrationRange[0](CA0)) {
      c.add("feed.CA0", concentrationRange[1]);
      CA0 = undefined;
    }
    const needB = (b ?? 1) > 0 || orderB === 1 || measuresB;
    CB0 = c.number(feed, "CB0", "feed", needB, needB ? [(x) => x > 0, "must be greater than zero: B takes part in the reaction"] : nonNegative);
    if (CB0 !== undefined && !concentrationRange[0](CB0)) {
      c.add("feed.CB0", concentrationRange[1]);
      CB0 = undefined;
    }
  }

  // points
  const points = root.points;
  const kind = isObject(m) ? m.kind : undefined;
  // the value a reading of zero species means, and the feed value it is compared with
  const feedValue = kind === "concentrationB" ? CB0 : CA0;
  const negativeLimit = feedValue !== undefined ? -NEGATIVE_NOISE_SHARE * feedValue : 0;
  let absorbanceFloor = -Infinity;
  if (kind === "absorbance" && isObject(m) && isNumber(m.epsilon) && isNumber(m.pathCm)) {
    const base = isNumber(m.baseline) ? m.baseline : 0;
    const c0 = (m.species === "B" ? CB0 : CA0) ?? 0;
    absorbanceFloor = base - Math.max(0.02, NEGATIVE_NOISE_SHARE * m.epsilon * m.pathCm * c0 * concentrationScale);
  }
  if (!Array.isArray(points)) c.add("points", points === undefined ? "is required" : "must be an array of [time, value] pairs");
  else {
    if (points.length < 3) c.add("points", `needs at least 3 points (got ${points.length})`);
    let percentRows = 0;
    let firstPercent = -1;
    points.forEach((p, i) => {
      const path = join("points", i);
      if (!Array.isArray(p) || p.length !== 2) {
        c.add(path, "must be a [time, value] pair");
        return;
      }
      if (!isNumber(p[0])) c.add(join(path, 0), describeNonNumber(p[0]));
      else if (Math.abs(p[0] * timeScale) > MAX_TIME_S) c.add(join(path, 0), `a time of ${p[0]} ${String(units?.time ?? "")} is more than ${MAX_TIME_S} s (about three years): check the time column and units.time`);
      const v = p[1];
      if (!isNumber(v)) {
        c.add(join(path, 1), describeNonNumber(v));
        return;
      }
      if (concentrationMeasured) {
        if (v < negativeLimit) c.add(join(path, 1), `a concentration cannot be negative (${v} is below zero by more than reading noise)`);
        else if (v > maxConcentration * 1000) c.add(join(path, 1), `${v} ${unitText} is far more than any solution holds: check the value`);
      } else if (kind === "conversionA") {
        if (v > 1 + NEGATIVE_NOISE_SHARE && v <= 100) {
          percentRows++;
          if (firstPercent < 0) firstPercent = i;
        } else if (v > 100) c.add(join(path, 1), `a conversion of ${v} is impossible: give the conversion as a fraction from 0 to 1`);
        else if (v < -NEGATIVE_NOISE_SHARE) c.add(join(path, 1), `a conversion cannot be negative (got ${v})`);
      } else if (kind === "absorbance") {
        if (v > MAX_ABSORBANCE) c.add(join(path, 1), `an absorbance of ${v} is beyond what a spectrometer reads (about 4 at most): check the column`);
        else if (v < absorbanceFloor) c.add(join(path, 1), `an absorbance of ${v} is below the baseline by more than reading noise: check the baseline and the blank`);
      } else if (Math.abs(v) > MAX_READING) c.add(join(path, 1), `a reading of ${v} is out of any instrument's range: check the value`);
    });
    if (percentRows > 0) {
      c.add(
        join(join("points", firstPercent), 1),
        `${percentRows} conversion(s) above 1: this looks like percent; divide by 100 (a conversion runs from 0 to 1)`,
      );
    }
  }

  // temperature and reference
  c.number(root, "temperatureC", "", false, temperatureRange);
  if (root.reference !== undefined) {
    const ref = c.object(root.reference, "reference", ["k", "TrefC", "EaKJ", "tolerancePct", "definedOn"]);
    if (ref) {
      c.number(ref, "k", "reference", true, [(x) => x > 0 && x <= MAX_K, `must be greater than zero and at most ${MAX_K}`]);
      const Ea = c.number(ref, "EaKJ", "reference", false, [
        (x) => x >= 0 && x <= MAX_EA_KJ,
        `must be from 0 to ${MAX_EA_KJ} kJ/mol (a value in J/mol? divide by 1000)`,
      ]);
      c.number(ref, "TrefC", "reference", Ea !== undefined, temperatureRange);
      c.number(ref, "tolerancePct", "reference", false, [(x) => x > 0 && x <= 1000, "must be greater than zero and at most 1000 (percent)"]);
      if (ref.definedOn !== undefined && ref.definedOn !== "A" && ref.definedOn !== "reaction") {
        c.add("reference.definedOn", 'must be "A" (k on A, -dCA/dt) or "reaction" (k on the rate of reaction, -(1/a) dCA/dt)');
      }
      if (Ea !== undefined && root.temperatureC === undefined) {
        c.add("temperatureC", "is required to carry the reference k to the run temperature with EaKJ");
      }
    }
  }

  if (root.options !== undefined) {
    const options = c.object(root.options, "options", ["lineThroughOrigin", "compareOrders", "noise", "fitSignalStart"]);
    if (options) {
      for (const key of ["lineThroughOrigin", "compareOrders", "fitSignalStart"]) {
        if (options[key] !== undefined && typeof options[key] !== "boolean") c.add(join("options", key), "must be true or false");
      }
      if (options.noise !== undefined && !(NOISE_CHOICES as readonly unknown[]).includes(options.noise)) {
        c.add("options.noise", `must be one of ${NOISE_CHOICES.join(", ")}`);
      }
    }
  }

  if (c.errors.length > 0) return { ok: false, errors: c.errors };
  return { ok: true, request: json as FitRequest };
}

/** Pooled Arrhenius request: benches with their temperature and fitted k (and its standard error). */
export interface ArrheniusRequest {
  arrhenius: {
    /** each bench's k per second, on A, with concentrations in mol/L; kStdErr weights the fit */
    benches: { id?: string; temperatureC: number; k: number; kStdErr?: number }[];
  };
}

export type AnyRequest = { kind: "fit"; request: FitRequest } | { kind: "arrhenius"; request: ArrheniusRequest };

export function validateArrheniusRequest(json: unknown): { ok: true; request: ArrheniusRequest } | { ok: false; errors: FieldError[] } {
  const c = new Collector();
  const root = c.object(json, "", ["arrhenius"]);
  if (!root) return { ok: false, errors: c.errors };
  const body = c.object(root.arrhenius, "arrhenius", ["benches"]);
  if (!body) return { ok: false, errors: c.errors };
  const benches = body.benches;
  if (!Array.isArray(benches)) c.add("arrhenius.benches", benches === undefined ? "is required" : "must be an array of benches");
  else {
    if (benches.length < 3) c.add("arrhenius.benches", `needs at least 3 benches for Ea and A with intervals (got ${benches.length})`);
    let withSe = 0;
    const temperatures = new Set<number>();
    benches.forEach((bench, i) => {
      const path = join("arrhenius.benches", i);
      const b = c.object(bench, path, ["id", "temperatureC", "k", "kStdErr"]);
      if (!b) return;
      if (b.id !== undefined && typeof b.id !== "string") c.add(join(path, "id"), "must be text");
      const T = c.number(b, "temperatureC", path, true, temperatureRange);
      if (T !== undefined) temperatures.add(T);
      c.number(b, "k", path, true, [(x) => x > 0 && x <= MAX_K, `must be greater than zero and at most ${MAX_K}`]);
      if (c.number(b, "kStdErr", path, false, positive) !== undefined) withSe++;
    });
    if (withSe > 0 && withSe < benches.length) {
      c.add("arrhenius.benches", `give kStdErr for every bench or for none (${withSe} of ${benches.length} have one)`);
    }
    if (benches.length >= 3 && temperatures.size < 2) c.add("arrhenius.benches", "needs at least two different temperatures");
  }
  if (c.errors.length > 0) return { ok: false, errors: c.errors };
  return { ok: true, request: json as ArrheniusRequest };
}

/** A fit request, or a pooled Arrhenius request (an object with an `arrhenius` field). */
export function validateRequest(json: unknown): { ok: true; value: AnyRequest } | { ok: false; errors: FieldError[] } {
  if (isObject(json) && "arrhenius" in json) {
    const r = validateArrheniusRequest(json);
    return r.ok ? { ok: true, value: { kind: "arrhenius", request: r.request } } : r;
  }
  const r = validateFitRequest(json);
  return r.ok ? { ok: true, value: { kind: "fit", request: r.request } } : r;
}
