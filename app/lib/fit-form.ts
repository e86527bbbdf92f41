// Turns the "check a data set" form (strings as typed, pasted rows) into an engine fit request,
// and engine error paths back into places on the form. Pure, so it runs in the browser and in tests.
import Papa from "papaparse";

export type LawChoice = "AB" | "A1" | "A2";
export const LAW_ORDERS: Record<LawChoice, { orderA: number; orderB: number; label: string }> = {
  AB: { orderA: 1, orderB: 1, label: "first order in A and in B (second order overall)" },
  A1: { orderA: 1, orderB: 0, label: "first order in A (pseudo-first order, B in excess)" },
  A2: { orderA: 2, orderB: 0, label: "second order in A alone" },
};

export const MEASURED_KINDS = {
  concentrationA: "concentration of A",
  concentrationB: "concentration of B (e.g. by titre)",
  conversionA: "conversion of A (0 to 1)",
  signal: "a signal linear in extent (conductivity, mixture absorbance)",
  absorbance: "absorbance of A or B (Beer-Lambert)",
} as const;
export type MeasuredKind = keyof typeof MEASURED_KINDS;

export interface FitFormValues {
  a: string;
  b: string;
  law: LawChoice;
  CA0: string;
  CB0: string;
  concentrationUnit: "mol/L" | "mmol/L";
  timeUnit: "s" | "min" | "h";
  kind: MeasuredKind;
  S0: string;
  Sinf: string;
  species: "A" | "B";
  epsilon: string;
  pathCm: string;
  baseline: string;
  temperatureC: string;
  refK: string;
  TrefC: string;
  EaKJ: string;
  tolerancePct: string;
  data: string;
}

/** A problem to show beside one field of the form. */
export interface FormProblem {
  field: keyof FitFormValues;
  message: string;
}

export interface ParsedPoints {
  points: [number, number][];
  /** 1-based line of the pasted text for each point, to name lines in messages */
  lines: number[];
  problems: FormProblem[];
}

function toNumber(raw: string): number | null {
  const s = raw.trim();
  if (s === "") return null;
  const x = Number(s);
  return Number.isFinite(x) ? x : null;
}

/**
 * Spreadsheets paste tab-separated rows; locales with a decimal comma separate with ";".
 * Papa's own guess needs nearly every row to split, which a single short row defeats.
 */
function pickDelimiter(text: string): string {
  const rows = text.split(/\r?\n/).filter((l) => l.trim());
  for (const d of ["\t", ";", "|"]) {
    if (rows.filter((l) => l.includes(d)).length * 2 >= rows.length) return d;
  }
  return ",";
}

/** Pasted rows of "time, value" (comma, tab, semicolon or bar separated; an optional header line). */
export function parsePoints(text: string): ParsedPoints {
  const out: ParsedPoints = { points: [], lines: [], problems: [] };
  if (!text.trim()) {
    out.problems.push({ field: "data", message: "Paste at least 3 rows of time and measured value." });
    return out;
  }
  const parsed = Papa.parse<string[]>(text.trim(), { skipEmptyLines: false, delimiter: pickDelimiter(text) });
  parsed.data.forEach((row, i) => {
    const line = i + 1;
    const cells = row.map((c) => c.trim());
    if (cells.every((c) => c === "")) return;
    // A first line that is not numeric is a header such as "time, conductivity".
    if (i === 0 && toNumber(cells[0] ?? "") === null) return;
    if (cells.length < 2) {
      out.problems.push({ field: "data", message: `Line ${line}: expected two columns (time, value), found one: "${cells[0]}".` });
      return;
    }
    const t = toNumber(cells[0]);
    const v = toNumber(cells[1]);
    if (t === null) out.problems.push({ field: "data", message: `Line ${line}, column 1 (time): "${cells[0]}" is not a number${cells[0].includes(",") ? " (use a point as the decimal mark)" : ""}.` });
    if (v === null) out.problems.push({ field: "data", message: `Line ${line}, column 2 (value): "${cells[1]}" is not a number${cells[1].includes(",") ? " (use a point as the decimal mark)" : ""}.` });
    if (t !== null && v !== null) {
      out.points.push([t, v]);
      out.lines.push(line);
    }
  });
  return out;
}

function numberField(values: FitFormValues, field: keyof FitFormValues, label: string, problems: FormProblem[], required: boolean) {
  const raw = String(values[field] ?? "").trim();
  if (raw === "") {
    if (required) problems.push({ field, message: `Enter ${label}.` });
    return undefined;
  }
  const x = toNumber(raw);
  if (x === null) problems.push({ field, message: `"${raw}" is not a number.` });
  return x ?? undefined;
}

/** Builds the engine request; problems found in the form itself come back beside their fields. */
export function buildFitRequest(values: FitFormValues): { request: Record<string, unknown>; lines: number[]; problems: FormProblem[] } {
  const problems: FormProblem[] = [];
  const num = (f: keyof FitFormValues, label: string, required = true) => numberField(values, f, label, problems, required);
  const orders = LAW_ORDERS[values.law];
  const measurement: Record<string, unknown> = { kind: values.kind };
  if (values.kind === "signal") {
    measurement.S0 = num("S0", "the signal at the start");
    const Sinf = num("Sinf", "the final signal", false);
    if (Sinf !== undefined) measurement.Sinf = Sinf;
  } else if (values.kind === "absorbance") {
    measurement.species = values.species;
    measurement.epsilon = num("epsilon", "the molar absorptivity");
    measurement.pathCm = num("pathCm", "the path length");
    const baseline = num("baseline", "the baseline", false);
    if (baseline !== undefined) measurement.baseline = baseline;
  }
  const parsed = parsePoints(values.data);
  problems.push(...parsed.problems);
  const request: Record<string, unknown> = {
    reaction: { a: num("a", "the coefficient a"), b: num("b", "the coefficient b"), orderA: orders.orderA, orderB: orders.orderB },
    feed: { CA0: num("CA0", "the initial concentration of A"), CB0: num("CB0", "the initial concentration of B", orders.orderB === 1) },
    units: { time: values.timeUnit, concentration: values.concentrationUnit },
    measurement,
    points: parsed.points,
  };
  const T = num("temperatureC", "the run temperature", false);
  if (T !== undefined) request.temperatureC = T;
  const refK = num("refK", "the reference rate constant", false);
  if (refK !== undefined) {
    const reference: Record<string, unknown> = { k: refK };
    const Tref = num("TrefC", "the reference temperature", false);
    const Ea = num("EaKJ", "the activation energy", false);
    const tol = num("tolerancePct", "the tolerance", false);
    if (Tref !== undefined) reference.TrefC = Tref;
    if (Ea !== undefined) reference.EaKJ = Ea;
    if (tol !== undefined) reference.tolerancePct = tol;
    request.reference = reference;
  }
  return { request, lines: parsed.lines, problems };
}

const PATH_FIELDS: Record<string, keyof FitFormValues> = {
  "reaction.a": "a",
  "reaction.b": "b",
  "feed.CA0": "CA0",
  "feed.CB0": "CB0",
  "measurement.S0": "S0",
  "measurement.Sinf": "Sinf",
  "measurement.epsilon": "epsilon",
  "measurement.pathCm": "pathCm",
  "measurement.baseline": "baseline",
  "measurement.species": "species",
  "measurement.kind": "kind",
  measurement: "kind",
  temperatureC: "temperatureC",
  "reference.k": "refK",
  "reference.TrefC": "TrefC",
  "reference.EaKJ": "EaKJ",
  "reference.tolerancePct": "tolerancePct",
  "units.time": "timeUnit",
  "units.concentration": "concentrationUnit",
};

/** Places an engine error (path + message) on the form; data rows are named by pasted line. */
export function problemFromEnginePath(path: string, message: string, lines: number[]): FormProblem {
  const point = /^points\[(\d+)\](?:\[(\d)\])?$/.exec(path);
  if (point) {
    const line = lines[Number(point[1])] ?? Number(point[1]) + 1;
    const column = point[2] === undefined ? "" : point[2] === "0" ? ", column 1 (time)" : ", column 2 (value)";
    return { field: "data", message: `Line ${line}${column}: ${message}` };
  }
  if (path === "points") return { field: "data", message: `Data: ${message}` };
  const field = PATH_FIELDS[path];
  return field ? { field, message: capitalise(message) } : { field: "data", message: `${path || "request"}: ${message}` };
}

function capitalise(s: string) {
  return s ? s[0].toUpperCase() + s.slice(1) : s;
}
