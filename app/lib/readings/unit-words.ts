// Units as people write them in a header cell or in a row of units under the header: time units,
// concentration units, and the other units a bench instrument labels its columns with. Kept apart
// from extract.ts so that table.ts (which finds a units row) can use them too.
import type { ConcentrationUnit, TimeUnit } from "../kinetics/units.ts";

const TIME_UNIT_WORDS: Record<string, TimeUnit> = {
  s: "s", sec: "s", secs: "s", second: "s", seconds: "s",
  min: "min", mins: "min", minute: "min", minutes: "min",
  h: "h", hr: "h", hrs: "h", hour: "h", hours: "h",
};

/** "min" -> "min", "seconds" -> "s"; null when the text is not a time unit. */
export function timeUnitFrom(unit: string): TimeUnit | null {
  return TIME_UNIT_WORDS[unit.trim().toLowerCase().replace(/\.$/, "")] ?? null;
}

/** "mol/L", "M", "mol L-1", "mol dm-3", "mol/dm3" -> mol/L; the same with m/milli -> mmol/L. */
export function concentrationUnitFrom(unit: string): ConcentrationUnit | null {
  const u = unit.trim().replace(/\s+/g, " ").replace(/[⁻−]/g, "-").replace(/¹/g, "1").replace(/³/g, "3").replace(/·/g, " ");
  if (u === "M") return "mol/L";
  if (u === "mM") return "mmol/L";
  const m = /^(m?)mol ?(\/ ?(l|dm3|dm\^3)|(l|dm)\^?-[13])$/i.exec(u);
  if (!m) return null;
  return m[1] ? "mmol/L" : "mol/L";
}

/** How a time column's cells are written, when a units row or header says so ("hh:mm:ss", "mm:ss"). */
export const TIME_LAYOUT_WORDS = /^(\[?h{1,2}\]?:mm(:ss)?|\[?mm\]?:ss|m:ss|h:mm:ss|min:s|min:sec)$/i;

/**
 * Other units instrument columns carry (conductivity, absorbance, transmittance, volume,
 * temperature, dimensionless): enough to recognise a row of units (common practice, no source).
 */
const OTHER_UNITS = /^(([mµu]?S) ?(\/ ?(cm|m)|(cm|m)-1)|[mµu]S|S|%|%T|AU|a\.?u\.?|abs|mL|ml|L|°C|degC|C|K|-|—|1|ppm|mV|V|pH)$/i;

/** A cell that holds only a unit: "min", "(mmol/L)", "[s]", "mS/cm", "%", "hh:mm:ss". */
export function isUnitCell(text: string): boolean {
  const t = text.trim().replace(/^[([{]\s*(.*?)\s*[)\]}]$/, "$1");
  if (t === "") return false;
  return timeUnitFrom(t) !== null || concentrationUnitFrom(t) !== null || TIME_LAYOUT_WORDS.test(t) || OTHER_UNITS.test(t);
}

/** The unit in a units-row cell without its brackets. */
export function unitCellText(text: string): string {
  return text.trim().replace(/^[([{]\s*(.*?)\s*[)\]}]$/, "$1");
}
