// A titration practical's value column as the group meant it: titres in mL (what the bench sheet
// asks for), converted with the practical's titrant, aliquot and stoichiometry, or concentrations
// the group worked out itself. Decided by the column's unit, then its heading, then the size of
// the first reading against what the bench's feed makes of it either way.
import { concentrationFromTitre, titrationText, type TitrationCalibration } from "../kinetics/titration.ts";
import { molPerLitrePer, type ConcentrationUnit } from "../kinetics/units.ts";
import { concentrationUnitFrom } from "../readings/unit-words.ts";

export interface TitrationSetup extends TitrationCalibration {
  species: "A" | "B";
}

export interface ValueColumn {
  letter: string;
  header: string;
  unit: string;
}

export interface TitreReading {
  titres: boolean;
  /** why that reading was assumed, for the preview */
  why: string;
}

const VOLUME_UNIT = /^(m?l|cm3|cm³|cm\^3|ml of titrant)$/i;
const TITRE_WORDS = /(titre|titer|titrant|burette|buret|volume|^v$|^v[ _(]|vol\b|ml)/i;
const CONCENTRATION_WORDS = /(mol|conc|^c$|^c[ _(\[]|^\[|\bm\b)/i;

/** Titres or concentrations? `startMolL` is the titrated species at mixing (the bench's feed). */
export function readTitres(values: readonly number[], column: ValueColumn | undefined, cal: TitrationSetup, startMolL: number, unit: ConcentrationUnit): TitreReading {
  const unitText = (column?.unit ?? "").trim();
  // the heading without its unit in brackets: "titre (mL)" is named "titre"
  const header = (column?.header ?? "").trim().replace(/\s*[([][^)\]]*[)\]]\s*$/, "") || (column?.header ?? "").trim();
  const name = column ? `${column.letter}${header ? ` (${header})` : ""}` : "the value column";
  if (unitText && VOLUME_UNIT.test(unitText)) return { titres: true, why: `column ${name} is in ${unitText}` };
  if (unitText && concentrationUnitFrom(unitText)) return { titres: false, why: `column ${name} is in ${unitText}` };
  if (header && TITRE_WORDS.test(header) && !CONCENTRATION_WORDS.test(header)) return { titres: true, why: `column ${name} is headed as a titre` };
  if (header && CONCENTRATION_WORDS.test(header) && !TITRE_WORDS.test(header)) return { titres: false, why: `column ${name} is headed as a concentration` };
  // by size: the first reading against the feed, read either way (a factor of e.g. 500 apart)
  const first = values[0];
  const asConc = first * molPerLitrePer(unit);
  const asTitre = concentrationFromTitre(cal, first);
  const off = (c: number) => (c > 0 && startMolL > 0 ? Math.abs(Math.log(c / startMolL)) : Infinity);
  const titres = off(asTitre) < off(asConc);
  return {
    titres,
    why: `no unit in column ${name}; its first reading, ${first}, is ${titres ? "the size of a titre in mL" : `the size of a concentration in ${unit}`} for this bench's feed`,
  };
}

/** The preview's note on how the value column was read. */
export function titreNote(reading: TitreReading, cal: TitrationSetup): string {
  return reading.titres
    ? `Read as titres in mL (${reading.why}) and converted to the concentration of ${cal.species} with the practical's titration: ${titrationText(cal, cal.species)}.`
    : `Read as concentrations of ${cal.species} you worked out yourself (${reading.why}), not as titres; nothing was converted.`;
}
