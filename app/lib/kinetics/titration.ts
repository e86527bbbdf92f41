// Titres (mL of titrant) to the titrated species' concentration in the reaction mixture, and
// back. Both arithmetic forms are affine in the titre, so the conversion is exact both ways.
//
// Direct titration of an aliquot V_a:            C = nu_t c_t V_t / V_a
// Quenched in a known excess of reagent Q (c_q, V_q) and the excess back-titrated:
//                                                 C = (nu_q c_q V_q - nu_t c_t V_t) / V_a
// nu_t: mol of the titrated species one mol of titrant stands for (1 for HCl against OH-, 2 for
// H2SO4 against OH-); nu_q: mol of the species one mol of quench reagent takes up. (Amount of
// substance balance of an acid-base titration; common practice, no source.)

export interface TitrationCalibration {
  /** titrant concentration, mol/L */
  titrantMolL: number;
  /** aliquot of the reaction mixture titrated, mL */
  aliquotMl: number;
  /** mol of the titrated species per mol of titrant (default 1) */
  speciesPerTitrant?: number;
  /** the aliquot is first run into this known excess, and the excess is titrated */
  quench?: { molL: number; ml: number; speciesPerQuench?: number };
}

/** Concentration (mol/L) of the titrated species in the mixture for a titre in mL. */
export function concentrationFromTitre(cal: TitrationCalibration, titreMl: number): number {
  const titrant = (cal.speciesPerTitrant ?? 1) * cal.titrantMolL * titreMl;
  if (!cal.quench) return titrant / cal.aliquotMl;
  const quench = (cal.quench.speciesPerQuench ?? 1) * cal.quench.molL * cal.quench.ml;
  return (quench - titrant) / cal.aliquotMl;
}

/** The titre (mL) a mixture of concentration C (mol/L) of the titrated species calls for. */
export function titreFromConcentration(cal: TitrationCalibration, C: number): number {
  const perMl = (cal.speciesPerTitrant ?? 1) * cal.titrantMolL;
  if (!cal.quench) return (C * cal.aliquotMl) / perMl;
  const quench = (cal.quench.speciesPerQuench ?? 1) * cal.quench.molL * cal.quench.ml;
  return (quench - C * cal.aliquotMl) / perMl;
}

/** The arithmetic in words, with the practical's numbers, for the preview and feedback. */
export function titrationText(cal: TitrationCalibration, species: string): string {
  const nt = cal.speciesPerTitrant ?? 1;
  const t = `${nt === 1 ? "" : `${nt} × `}${cal.titrantMolL} mol/L × titre`;
  if (!cal.quench) return `[${species}] = ${t} / ${cal.aliquotMl} mL aliquot`;
  const nq = cal.quench.speciesPerQuench ?? 1;
  return `[${species}] = (${nq === 1 ? "" : `${nq} × `}${cal.quench.molL} mol/L × ${cal.quench.ml} mL quench − ${t}) / ${cal.aliquotMl} mL aliquot (back-titration)`;
}
