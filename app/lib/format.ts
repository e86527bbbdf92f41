// Number formatting for screens: significant figures, a dash for what could not be computed.
export function sig(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  if (x === 0) return "0";
  const a = Math.abs(x);
  if (a >= 1e5 || a < 1e-4) return x.toExponential(digits - 1).replace("e", "×10^").replace("^+", "^");
  return Number(x.toPrecision(digits)).toString();
}

/** "0.1549 (95 % CI 0.1512 to 0.1586)" */
export function withInterval(x: number, ci: [number, number] | null | undefined, digits = 4): string {
  if (!ci || !ci.every((v) => v !== null && Number.isFinite(v))) return sig(x, digits);
  return `${sig(x, digits)} (95 % CI ${sig(ci[0], digits)} to ${sig(ci[1], digits)})`;
}

export function unitText(kUnit: string, perMinute = false): string {
  const u = kUnit === "1/s" ? "1/s" : "L/(mol·s)";
  return perMinute ? u.replace("s)", "min)").replace("1/s", "1/min") : u;
}
