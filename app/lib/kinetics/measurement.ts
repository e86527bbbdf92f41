// What was measured, and how it maps to CA. Every supported quantity is affine in CA
// (m = offset + slope * CA), so the map is two numbers and inverts exactly.

import { excessOfB, maxReactedA, type Feed } from "./rateLaws.ts";

export type Measurement =
  | { kind: "concentrationA" }
  | { kind: "concentrationB" }
  | { kind: "conversionA" }
  /** a signal linear in the extent of reaction: S0 at the start, Sinf when the limiting reagent is used up */
  | { kind: "signal"; S0: number; Sinf?: number }
  /** Beer-Lambert: absorbance = baseline + epsilon [L/(mol cm)] * pathCm * C(species) [mol/L] */
  | { kind: "absorbance"; species: "A" | "B"; epsilon: number; pathCm: number; baseline?: number };

export type MeasurementKind = Measurement["kind"];
export const MEASUREMENT_KINDS: readonly MeasurementKind[] = [
  "concentrationA",
  "concentrationB",
  "conversionA",
  "signal",
  "absorbance",
];

export interface AffineMap {
  offset: number;
  slope: number;
}

/**
 * The map CA -> measured value (SI concentrations). For a signal, `Sinf` overrides the
 * measurement's own (used when Sinf is fitted); it must be known one way or the other.
 */
export function measurementMap(m: Measurement, feed: Feed, Sinf?: number): AffineMap {
  switch (m.kind) {
    case "concentrationA":
      return { offset: 0, slope: 1 };
    case "concentrationB":
      // CB = CB0 - nu (CA0 - CA)
      return { offset: excessOfB(feed), slope: feed.nu };
    case "conversionA":
      // XA = (CA0 - CA) / CA0
      return { offset: 1, slope: -1 / feed.CA0 };
    case "signal": {
      const end = Sinf ?? m.Sinf;
      if (end === undefined) throw new Error("signal map needs Sinf");
      return signalMap(m.S0, end, feed);
    }
    case "absorbance": {
      const el = m.epsilon * m.pathCm;
      const base = m.baseline ?? 0;
      return m.species === "A"
        ? { offset: base, slope: el }
        : { offset: base + el * excessOfB(feed), slope: el * feed.nu };
    }
  }
}

/** S = S0 + (Sinf - S0) (CA0 - CA) / (CA0 - CA_final): linear in the extent of reaction. */
export function signalMap(S0: number, Sinf: number, feed: Feed): AffineMap {
  const span = (Sinf - S0) / maxReactedA(feed);
  return { offset: S0 + span * feed.CA0, slope: -span };
}

export function toCA(map: AffineMap, value: number): number {
  return (value - map.offset) / map.slope;
}

export function fromCA(map: AffineMap, CA: number): number {
  return map.offset + map.slope * CA;
}
