// The one feed ratio: M = CB0 / (ν·CA0), ν = b/a for a A + b B. The stoichiometric feed is
// M = 1 whatever the coefficients, so a bench reads the same in the designer, the gradebook,
// the workbook and the review. Every column that shows it carries the formula in its header.
export const FEED_RATIO_FORMULA = "CB0/(ν·CA0)";
export const FEED_RATIO_HEADER = `M = ${FEED_RATIO_FORMULA}`;

/** ν = b/a (1 when a is not positive). */
export function nuOf(reaction: { a?: number; b?: number; coeffA?: number; coeffB?: number }): number {
  const a = reaction.a ?? reaction.coeffA ?? 1;
  const b = reaction.b ?? reaction.coeffB ?? 1;
  return a > 0 ? b / a : 1;
}

export function feedRatio(CA0: number, CB0: number, nu: number): number {
  return CB0 / (nu * CA0);
}
