// Number formatting for screens, in one style everywhere: significant figures, a true minus
// sign (−), powers of ten as ×10⁻⁴ (never e-4 or 10^-4), a dash for what could not be computed,
// and intervals with enough digits for their two ends to differ.
const SUPERSCRIPT: Record<string, string> = { "-": "⁻", "+": "", "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹" };
export const MINUS = "−";

function superscript(exponent: string) {
  return [...exponent].map((c) => SUPERSCRIPT[c] ?? c).join("");
}

/**
 * `x` to `digits` significant figures; scientific (×10ⁿ) below 0.001 and from 100 000 up.
 * Trailing zeros are dropped unless `keepZeros` (where the digits themselves carry meaning).
 */
export function sig(x: number | null | undefined, digits = 4, keepZeros = false): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  if (x === 0) return "0";
  const a = Math.abs(x);
  let text: string;
  if (a >= 1e5 || a < 1e-3) {
    const [mantissa, exponent] = a.toExponential(digits - 1).split("e");
    text = `${keepZeros ? mantissa : Number(mantissa)}×10${superscript(exponent)}`;
  } else {
    // toPrecision writes 1010 to 3 figures as "1.01e+3": whole numbers carry no trailing zeros to keep.
    const rounded = a.toPrecision(digits);
    text = keepZeros && !rounded.includes("e") ? rounded : Number(rounded).toString();
  }
  return x < 0 ? MINUS + text : text;
}

/** The fewest significant figures (at least `digits`) at which every value prints differently. */
export function distinctDigits(values: number[], digits = 4, max = 12): number {
  const finite = values.filter(Number.isFinite);
  for (let d = digits; d < max; d++) {
    const texts = finite.map((v) => sig(v, d, true));
    if (new Set(texts).size === new Set(finite).size) return d;
  }
  return max;
}

/** "0.1549 (95 % CI 0.1512 to 0.1586)", with digits enough for the value and both ends to differ. */
export function withInterval(x: number, ci: [number, number] | null | undefined, digits = 4): string {
  if (!ci || !ci.every((v) => v !== null && Number.isFinite(v))) return sig(x, digits);
  const d = distinctDigits([x, ci[0], ci[1]], digits);
  return `${sig(x, d, true)} (95 % CI ${sig(ci[0], d, true)} to ${sig(ci[1], d, true)})`;
}

export function unitText(kUnit: string, perMinute = false): string {
  const u = kUnit === "1/s" ? "1/s" : "L/(mol·s)";
  return perMinute ? u.replace("s)", "min)").replace("1/s", "1/min") : u;
}

/**
 * Text written elsewhere (engine messages) in the screen's number style: 1.2e-5 becomes
 * 1.2×10⁻⁵, a hyphen before a number becomes a minus sign, * between terms becomes ·.
 */
export function styleNumbers(text: string): string {
  return text
    .replace(/(\d(?:\.\d+)?)e([+-]?\d+)/g, (_, m: string, e: string) => `${m}×10${superscript(e.replace(/^\+/, ""))}`)
    .replace(/(^|[\s(=:,[])-(?=\d|\.\d)/g, `$1${MINUS}`)
    .replace(/(\w|\))\s?\*\s?(?=\w|\()/g, "$1·");
}

const MODEL_TEXT: Record<string, string> = {
  "first-order": "first order in A",
  "second-order-A": "second order in A",
  "second-order-AB": "first order in A and B",
  "second-order-AB-stoichiometric": "first order in A and B, stoichiometric feed",
  "second-order-AB-unequal": "first order in A and B, unequal feed",
};

/** A fitted model's key in words for staff and students ("second-order-A" -> "second order in A"). */
export function modelText(model: string): string {
  return MODEL_TEXT[model] ?? model.replace(/-/g, " ");
}

/** An account type's key in words ("course-creator" -> "course creator"). */
export function accountTypeText(role: string): string {
  return role.replace(/-/g, " ");
}
