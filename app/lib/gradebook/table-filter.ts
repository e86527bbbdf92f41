// What a gradebook column's filter box accepts, read the same way on the server (first render)
// and in the browser. Number columns take a comparison ("> 60", "<= 0.5"), a range ("50 to 70",
// ends included) or "missing"; anything else is looked for in the cell's text, case ignored.
// Numbers may use a true minus (−) or a decimal comma, and powers of ten as 1e-4.

export type FilterRule =
  | { kind: "all" }
  | { kind: "missing" }
  | { kind: "compare"; op: "<" | "<=" | ">" | ">=" | "="; value: number }
  | { kind: "range"; low: number; high: number }
  | { kind: "text"; needle: string };

const NUMBER = String.raw`[-+]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:e[-+]?\d+)?`;
const COMPARE = new RegExp(`^(<=|>=|<|>|=)\\s*(${NUMBER})$`, "i");
const RANGE = new RegExp(`^(${NUMBER})\\s*(?:to|\\.\\.)\\s*(${NUMBER})$`, "i");

function toNumber(text: string): number {
  return Number(text.replace(",", "."));
}

/** The rule a filter box's text stands for. */
export function parseFilter(raw: string): FilterRule {
  const text = raw.trim().replace(/−/g, "-").replace(/≤/g, "<=").replace(/≥/g, ">=");
  if (!text) return { kind: "all" };
  if (/^(missing|—|-)$/i.test(text)) return { kind: "missing" };
  const c = COMPARE.exec(text);
  if (c) return { kind: "compare", op: c[1] as "<", value: toNumber(c[2]) };
  const r = RANGE.exec(text);
  if (r) {
    const [a, b] = [toNumber(r[1]), toNumber(r[2])];
    return { kind: "range", low: Math.min(a, b), high: Math.max(a, b) };
  }
  return { kind: "text", needle: raw.trim().toLowerCase() };
}

/**
 * Whether a cell passes the rule: `value` is the cell's number (null when it has none: missing
 * work, a mark not yet made), `text` what the cell shows.
 */
export function passes(rule: FilterRule, value: number | null, text: string): boolean {
  switch (rule.kind) {
    case "all":
      return true;
    case "missing":
      return value === null;
    case "compare": {
      if (value === null) return false;
      const v = rule.value;
      return rule.op === "<" ? value < v : rule.op === "<=" ? value <= v : rule.op === ">" ? value > v : rule.op === ">=" ? value >= v : value === v;
    }
    case "range":
      return value !== null && value >= rule.low && value <= rule.high;
    case "text":
      return text.toLowerCase().includes(rule.needle);
  }
}

/** Shorthand for a column's filter function: parse (cached per text) and test. */
const cache = new Map<string, FilterRule>();
export function cellPasses(filterText: string, value: number | null, text: string): boolean {
  let rule = cache.get(filterText);
  if (!rule) {
    if (cache.size > 200) cache.clear();
    cache.set(filterText, (rule = parseFilter(filterText)));
  }
  return passes(rule, value, text);
}
