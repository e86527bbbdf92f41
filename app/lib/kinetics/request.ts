// The fit request (JSON in, as sent by the command line or an API route) and its validation.
// Validation collects every problem with the path where it is, rather than stopping at the first.

import { lawFromOrders } from "./rateLaws.ts";
import { MEASUREMENT_KINDS, type Measurement } from "./measurement.ts";
import { CONCENTRATION_UNITS, TIME_UNITS, ZERO_CELSIUS_K, type ConcentrationUnit, type TimeUnit } from "./units.ts";

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
  reference?: { k: number; TrefC?: number; EaKJ?: number; tolerancePct?: number };
  options?: {
    /** fit the straight line through the origin instead of with a free intercept (default false) */
    lineThroughOrigin?: boolean;
    /** also fit the other supported rate laws and report which describes the data best (default true) */
    compareOrders?: boolean;
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
  const feed = c.object(root.feed, "feed", ["CA0", "CB0"]);
  if (feed) {
    c.number(feed, "CA0", "feed", true, [(x) => x > 0, "must be greater than zero: a feed of zero cannot react"]);
    const needB = (b ?? 1) > 0 || orderB === 1 || measuresB;
    c.number(feed, "CB0", "feed", needB, needB ? [(x) => x > 0, "must be greater than zero: B takes part in the reaction"] : nonNegative);
  }

  // units
  const units = c.object(root.units, "units", ["time", "concentration"]);
  if (units) {
    if (!(TIME_UNITS as readonly unknown[]).includes(units.time)) {
      c.add("units.time", `must be one of ${TIME_UNITS.join(", ")}`);
    }
    if (!(CONCENTRATION_UNITS as readonly unknown[]).includes(units.concentration)) {
      c.add("units.concentration", `must be one of ${CONCENTRATION_UNITS.join(", ")}`);
    }
  }

  // points
  const points = root.points;
  if (!Array.isArray(points)) c.add("points", points === undefined ? "is required" : "must be an array of [time, value] pairs");
  else {
    if (points.length < 3) c.add("points", `needs at least 3 points (got ${points.length})`);
    points.forEach((p, i) => {
      const path = join("points", i);
      if (!Array.isArray(p) || p.length !== 2) {
        c.add(path, "must be a [time, value] pair");
        return;
      }
      if (!isNumber(p[0])) c.add(join(path, 0), describeNonNumber(p[0]));
      if (!isNumber(p[1])) c.add(join(path, 1), describeNonNumber(p[1]));
      else if (concentrationMeasured && p[1] < 0) c.add(join(path, 1), "a concentration cannot be negative");
    });
  }

  // temperature and reference
  c.number(root, "temperatureC", "", false, aboveAbsoluteZero);
  if (root.reference !== undefined) {
    const ref = c.object(root.reference, "reference", ["k", "TrefC", "EaKJ", "tolerancePct"]);
    if (ref) {
      c.number(ref, "k", "reference", true, positive);
      const Ea = c.number(ref, "EaKJ", "reference", false, nonNegative);
      c.number(ref, "TrefC", "reference", Ea !== undefined, aboveAbsoluteZero);
      c.number(ref, "tolerancePct", "reference", false, positive);
      if (Ea !== undefined && root.temperatureC === undefined) {
        c.add("temperatureC", "is required to carry the reference k to the run temperature with EaKJ");
      }
    }
  }

  if (root.options !== undefined) {
    const options = c.object(root.options, "options", ["lineThroughOrigin", "compareOrders"]);
    if (options) {
      for (const key of ["lineThroughOrigin", "compareOrders"]) {
        if (options[key] !== undefined && typeof options[key] !== "boolean") c.add(join("options", key), "must be true or false");
      }
    }
  }

  if (c.errors.length > 0) return { ok: false, errors: c.errors };
  return { ok: true, request: json as FitRequest };
}
