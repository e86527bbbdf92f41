// Short titles of the engine's flag codes, for staff screens (the fit report, the gradebook).
export const FLAG_TITLE: Record<string, string> = {
  "few-points": "Few readings",
  "low-conversion": "Little of the reaction covered",
  "unit-slip": "Units look off",
  curvature: "Residuals bend",
  "beyond-asymptote": "Readings past the long-time limit",
  "time-order": "Times out of order",
  "order-mismatch": "Another rate law fits better",
  "straight-line-bias": "Hand line biased",
  "fit-not-converged": "Curve fit did not settle",
  "feed-mismatch": "First reading does not match the feed",
  outlier: "A reading far from the rest",
  "fits-disagree": "The two fits disagree",
  "wrong-line-form": "Reported k from the wrong straight line",
};

/** The title of a flag code, or the code itself for one without a title. */
export function flagTitle(code: string): string {
  return FLAG_TITLE[code] ?? code;
}
