// The audit log's before/after values as short readable lines ("role: student → demonstrator"),
// not raw JSON. Pure, so the page and tests share it.
function valueText(v: unknown): string {
  if (v === null || v === undefined) return "—";
  if (typeof v === "boolean") return v ? "yes" : "no";
  if (typeof v === "object") return JSON.stringify(v);
  return String(v);
}

function asRecord(v: unknown): Record<string, unknown> | null {
  return v && typeof v === "object" && !Array.isArray(v) ? (v as Record<string, unknown>) : null;
}

/** One line per field: changed fields as "field: before → after", new or removed ones alone. */
export function auditChanges(before: unknown, after: unknown): string[] {
  const b = asRecord(before);
  const a = asRecord(after);
  if (!b && !a) return [];
  if (!b || !a) {
    const only = (b ?? a)!;
    const arrow = b ? "was " : "";
    return Object.entries(only).map(([k, v]) => `${k}: ${arrow}${valueText(v)}`);
  }
  const keys = [...new Set([...Object.keys(b), ...Object.keys(a)])];
  return keys.map((k) => (k in b && k in a && valueText(b[k]) !== valueText(a[k]) ? `${k}: ${valueText(b[k])} → ${valueText(a[k])}` : `${k}: ${valueText(a[k] ?? b[k])}`));
}
