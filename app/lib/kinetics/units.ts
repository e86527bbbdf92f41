// Unit conversion at the edges of the engine; everything inside is SI (s, mol/L, K).

export type TimeUnit = "s" | "min" | "h";
export type ConcentrationUnit = "mol/L" | "mmol/L";

export const TIME_UNITS: readonly TimeUnit[] = ["s", "min", "h"];
export const CONCENTRATION_UNITS: readonly ConcentrationUnit[] = ["mol/L", "mmol/L"];

const SECONDS_PER: Record<TimeUnit, number> = { s: 1, min: 60, h: 3600 };
const MOL_PER_L: Record<ConcentrationUnit, number> = { "mol/L": 1, "mmol/L": 1e-3 };

/** Seconds in one of the given unit. */
export function secondsPer(unit: TimeUnit): number {
  return SECONDS_PER[unit];
}

/** mol/L in one of the given unit. */
export function molPerLitrePer(unit: ConcentrationUnit): number {
  return MOL_PER_L[unit];
}

export const ZERO_CELSIUS_K = 273.15;

export function celsiusToKelvin(c: number): number {
  return c + ZERO_CELSIUS_K;
}
