// Integrated rate laws for a A + b B -> products in a constant-volume batch reactor,
// -dCA/dt = k CA^alpha CB^beta, CB = CB0 - nu (CA0 - CA), nu = b/a. All SI: s, mol/L.

export type RateLaw = "first-order" | "second-order-A" | "second-order-AB";
export type ModelName =
  | "first-order"
  | "second-order-A"
  | "second-order-AB-stoichiometric"
  | "second-order-AB-unequal";

export const RATE_LAWS: readonly RateLaw[] = ["first-order", "second-order-A", "second-order-AB"];

export interface Feed {
  /** initial concentration of A, mol/L */
  CA0: number;
  /** initial concentration of B, mol/L (irrelevant when nu = 0 and the law ignores B) */
  CB0: number;
  /** moles of B used per mole of A, b/a */
  nu: number;
}

/** The rate law for a pair of orders, or null when the engine does not support it. */
export function lawFromOrders(orderA: number, orderB: number): RateLaw | null {
  if (orderA === 1 && orderB === 0) return "first-order";
  if (orderA === 2 && orderB === 0) return "second-order-A";
  if (orderA === 1 && orderB === 1) return "second-order-AB";
  return null;
}

/** B left over when all A has reacted, CB0 - nu CA0 (negative when B limits). */
export function excessOfB(feed: Feed): number {
  return feed.CB0 - feed.nu * feed.CA0;
}

// Feeds made up in the lab are known to a few significant figures; a relative
// mismatch below this is treated as exactly stoichiometric for the choice of label.
const STOICHIOMETRIC_RELATIVE = 1e-6;

export function isStoichiometric(feed: Feed): boolean {
  const scale = Math.max(feed.CB0, feed.nu * feed.CA0);
  return Math.abs(excessOfB(feed)) <= STOICHIOMETRIC_RELATIVE * scale;
}

export function modelName(law: RateLaw, feed: Feed): ModelName {
  if (law !== "second-order-AB") return law;
  return isStoichiometric(feed) ? "second-order-AB-stoichiometric" : "second-order-AB-unequal";
}

/** Which reagent runs out first; A when B is not consumed (nu = 0). */
export function limitingReagent(feed: Feed): "A" | "B" {
  return feed.nu > 0 && feed.CB0 < feed.nu * feed.CA0 ? "B" : "A";
}

/** Concentration of A that can react before the limiting reagent is used up. */
export function maxReactedA(feed: Feed): number {
  return limitingReagent(feed) === "B" ? feed.CB0 / feed.nu : feed.CA0;
}

/** Long-time value of CA set by stoichiometry: 0, or CA0 - CB0/nu when B limits. */
export function finalCA(feed: Feed): number {
  return feed.CA0 - maxReactedA(feed);
}

/** expm1(x)/x, continuous at 0 (expm1 keeps full relative accuracy for small x). */
function expm1OverX(x: number): number {
  return x === 0 ? 1 : Math.expm1(x) / x;
}

/** log1p(z)/z, continuous at 0. */
function log1pOverZ(z: number): number {
  return z === 0 ? 1 : Math.log1p(z) / z;
}

/**
 * Closed-form CA(t). The A-B law is written CA0 / (1 + CB0 k t phi(D k t)) with
 * D = CB0 - nu CA0 and phi(x) = expm1(x)/x: it equals the unequal-feed solution for
 * D != 0 and tends smoothly to the stoichiometric one, CA0 / (1 + nu CA0 k t), as D -> 0.
 */
export function concentrationA(law: RateLaw, feed: Feed, k: number, t: number): number {
  const { CA0, CB0 } = feed;
  switch (law) {
    case "first-order":
      return CA0 * Math.exp(-k * t);
    case "second-order-A":
      return CA0 / (1 + CA0 * k * t);
    case "second-order-AB": {
      const kt = k * t;
      return CA0 / (1 + CB0 * kt * expm1OverX(excessOfB(feed) * kt));
    }
  }
}

/** dCA/dk of the closed form, for the Jacobian of the nonlinear fit. */
export function concentrationASensitivity(law: RateLaw, feed: Feed, k: number, t: number): number {
  return sensitivityGivenCA(law, feed, k, t, concentrationA(law, feed, k, t));
}

/**
 * dCA/dk when CA(t) is already known (saves the transcendental functions in fitting loops).
 * A-B law: with Den = CA0/CA = 1 + CB0 k t phi(x), x = D k t, dDen/dk = CB0 t e^x, so
 * dCA/dk = -CB0 t e^x CA^2 / CA0.
 */
export function sensitivityGivenCA(law: RateLaw, feed: Feed, k: number, t: number, CA: number): number {
  switch (law) {
    case "first-order":
      return -t * CA;
    case "second-order-A":
      return -t * CA * CA;
    case "second-order-AB": {
      const { CA0, CB0 } = feed;
      const x = excessOfB(feed) * k * t;
      if (x <= 0) return (-CB0 * t * Math.exp(x) * CA * CA) / CA0;
      // e^x CA^2 = CA0^2 / (Den * Den e^-x); Den e^-x stays finite for large x
      const kt = k * t;
      const den = CA0 / CA;
      const denScaled = Math.exp(-x) + CB0 * kt * (-Math.expm1(-x) / x);
      return (-CB0 * t * CA0) / (den * denScaled);
    }
  }
}

/**
 * Straight-line form y(CA) scaled so that y = k t exactly. NaN where the form is
 * undefined (CA <= 0, or CB <= 0 for the A-B law: at or past the long-time limit).
 * The A-B form is u psi(D u), u = (CA0 - CA)/(CB0 CA), psi(z) = log1p(z)/z, which is
 * ln[(CB CA0)/(CB0 CA)]/D for D != 0 and (1/CA - 1/CA0)/nu at D = 0, with no
 * division of two vanishing numbers near a stoichiometric feed.
 */
export function lineY(law: RateLaw, feed: Feed, CA: number): number {
  const { CA0, CB0 } = feed;
  if (!(CA > 0)) return NaN;
  switch (law) {
    case "first-order":
      return -Math.log1p((CA - CA0) / CA0);
    case "second-order-A":
      return (CA0 - CA) / (CA * CA0);
    case "second-order-AB": {
      const u = (CA0 - CA) / (CB0 * CA);
      const z = excessOfB(feed) * u;
      if (!(z > -1)) return NaN;
      return u * log1pOverZ(z);
    }
  }
}

export interface TextbookLine {
  /** the y plotted against t in the usual textbook form */
  y: string;
  /** textbook slope = factor * k */
  factor: number;
}

/** The conventional straight-line form for the model and how its slope relates to k. */
export function textbookLine(law: RateLaw, feed: Feed): TextbookLine {
  switch (modelName(law, feed)) {
    case "first-order":
      return { y: "ln(CA0/CA)", factor: 1 };
    case "second-order-A":
      return { y: "1/CA - 1/CA0", factor: 1 };
    case "second-order-AB-stoichiometric":
      return { y: "1/CA - 1/CA0", factor: feed.nu };
    case "second-order-AB-unequal":
      return { y: "ln[(CB*CA0)/(CB0*CA)]", factor: excessOfB(feed) };
  }
}

/** Time (s) at which CA reaches the given value, or NaN if it never does. For designing runs. */
export function timeToReach(law: RateLaw, feed: Feed, k: number, CA: number): number {
  return lineY(law, feed, CA) / k;
}

/** Unit of k for a law, k being always per second. */
export function rateConstantUnit(law: RateLaw): "1/s" | "L/(mol*s)" {
  return law === "first-order" ? "1/s" : "L/(mol*s)";
}
