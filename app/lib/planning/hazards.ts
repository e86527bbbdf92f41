// GHS pictogram codes and a few common hazard statements, for forms and printed cautions.
// Codes and wording of the UN Globally Harmonized System (open standard); texts from memory.
export const PICTOGRAMS: Record<string, string> = {
  GHS01: "explosive",
  GHS02: "flammable",
  GHS03: "oxidising",
  GHS04: "gas under pressure",
  GHS05: "corrosive",
  GHS06: "acutely toxic",
  GHS07: "harmful or irritant",
  GHS08: "serious health hazard",
  GHS09: "hazardous to the aquatic environment",
};

export const HAZARD_STATEMENTS: Record<string, string> = {
  H225: "Highly flammable liquid and vapour.",
  H226: "Flammable liquid and vapour.",
  H290: "May be corrosive to metals.",
  H302: "Harmful if swallowed.",
  H314: "Causes severe skin burns and eye damage.",
  H315: "Causes skin irritation.",
  H318: "Causes serious eye damage.",
  H319: "Causes serious eye irritation.",
  H335: "May cause respiratory irritation.",
  H336: "May cause drowsiness or dizziness.",
  H411: "Toxic to aquatic life with long lasting effects.",
};

export const CLOSING_CAUTION = "Follow your institution's risk assessment and local rules.";

export const isHazardCode = (s: string) => /^(EU)?H\d{3}[A-Za-z]{0,2}$/.test(s);
export const isPictogramCode = (s: string) => s in PICTOGRAMS;

/** Comma- or space-separated codes from a form field, upper-cased. */
export function splitCodes(text: string): string[] {
  return text
    .split(/[\s,;]+/)
    .map((s) => s.trim().toUpperCase())
    .filter(Boolean);
}
