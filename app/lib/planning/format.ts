// Number styles for planning screens and print: true minus sign, units always shown.
export function fixed(x: number | null | undefined, digits: number): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  return x.toFixed(digits).replace("-", "−");
}

/** A value with powers of ten as ×10⁻⁴ when it is very small or large. */
export function sci(x: number, digits = 3): string {
  if (!Number.isFinite(x)) return "—";
  if (x === 0) return "0";
  const e = Math.floor(Math.log10(Math.abs(x)));
  if (e >= -2 && e < 4) return Number(x.toPrecision(digits)).toString().replace("-", "−");
  const sup: Record<string, string> = { "-": "⁻", "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹" };
  const m = (x / 10 ** e).toFixed(digits - 1).replace("-", "−");
  return `${m} ×10${String(e).split("").map((c) => sup[c]).join("")}`;
}

export const minutes = (m: number | null | undefined) => (m === null || m === undefined || !Number.isFinite(m) ? "never" : `${fixed(m, m < 10 ? 1 : 0)} min`);
export const mL = (v: number) => `${fixed(v, 1)} mL`;
export const molL = (c: number) => `${fixed(c, 4)} mol/L`;
