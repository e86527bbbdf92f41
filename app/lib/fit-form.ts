// Turns the "check a data set" form (strings as typed, pasted rows) into an engine fit request,
// and engine error paths back into places on the form. Pure, so it runs in the browser and in tests.
import { splitDecimalMessage } from "~/lib/readings/decimal-comma";
import Papa from "papaparse";
import { styleNumbers } from "./format";

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
  /** what was read, in words (separator, decimal mark, which columns), when anything was */
  note: string | null;
}

type Separator = "\t" | ";" | "," | "|" | " ";
const SEPARATORS: Separator[] = ["\t", ";", ",", "|", " "];
const SEPARATOR_NAME: Record<Separator, string> = { "\t": "tabs", ";": "semicolons", ",": "commas", "|": "vertical bars", " ": "spaces" };
type DecimalMark = "." | ",";

const TIME_UNITS_IN_CELLS: Record<string, FitFormValues["timeUnit"]> = { s: "s", sec: "s", min: "min", h: "h", hr: "h" };
const CONCENTRATION_UNITS_IN_CELLS: Record<string, FitFormValues["concentrationUnit"]> = { "mol/l": "mol/L", m: "mol/L", "mmol/l": "mmol/L", mm: "mmol/L" };

/** A number as typed, with a decimal point or comma and an optional unit after it ("5 min", "2,1 mM"). */
const CELL = /^([+\-−]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+\-−]?\d+)?)\s*([A-Za-zµ]+(?:\/[A-Za-z]+)?)?$/;

function readCell(raw: string, decimal: DecimalMark): { value: number; unit: string | null } | null {
  const m = CELL.exec(raw.trim());
  if (!m) return null;
  let text = m[1].replace(/−/g, "-");
  if (decimal === ",") {
    if (text.includes(".")) return null;
    text = text.replace(",", ".");
  } else if (text.includes(",")) return null;
  const value = Number(text);
  return Number.isFinite(value) ? { value, unit: m[2] ?? null } : null;
}

/** A plain number typed into a form field (decimal point, no unit), or null. */
function toNumber(raw: string): number | null {
  const cell = readCell(raw, ".");
  return cell && cell.unit === null ? cell.value : null;
}

function splitRows(text: string, sep: Separator): string[][] {
  if (sep === " ") return text.split(/\r?\n/).map((l) => (l.trim() ? l.trim().split(/\s+/) : []));
  // papaparse for real separators (quoted header cells such as "time, s" stay whole).
  const parsed = Papa.parse<string[]>(text, { delimiter: sep, skipEmptyLines: false, newline: text.includes("\r\n") ? "\r\n" : "\n" });
  return parsed.data.map((row) => (row.every((c) => !c.trim()) ? [] : row.map((c) => c.trim())));
}

interface Layout {
  sep: Separator;
  decimal: DecimalMark;
  rows: string[][];
  header: boolean;
  /** rows whose first two cells read as numbers */
  score: number;
}

/**
 * Separator and decimal mark are found together: each pair is tried, and the one under which the
 * most rows give two numbers wins (ties: the order of SEPARATORS, decimal point first).
 */
function detectLayout(text: string): Layout {
  let best: Layout | null = null;
  for (const sep of SEPARATORS) {
    const rows = splitRows(text, sep);
    const first = rows.findIndex((r) => r.length > 0);
    for (const decimal of [".", ","] as DecimalMark[]) {
      if (sep === "," && decimal === ",") continue;
      const header = first >= 0 && readCell(rows[first][0] ?? "", decimal) === null;
      let score = 0;
      rows.forEach((r, i) => {
        if ((header && i === first) || r.length < 2) return;
        if (readCell(r[0], decimal) && readCell(r[1], decimal)) score++;
      });
      if (!best || score > best.score) best = { sep, decimal, rows, header, score };
    }
  }
  return best!;
}

/** More than this many lines with the same problem is a problem of the whole paste: one message. */
const SAME_PROBLEM_LINES = 3;

function lineList(lines: number[]) {
  return lines.length > 6 ? `${lines.slice(0, 5).join(", ")}, …` : lines.join(", ");
}

export interface PasteUnits {
  time?: FitFormValues["timeUnit"];
  concentration?: FitFormValues["concentrationUnit"];
  kind?: MeasuredKind;
}

/**
 * Pasted rows of "time, value": separated by tabs, semicolons, commas, bars or spaces, with a
 * decimal point or comma, an optional header line, and units in the cells if they match the form's.
 */
export function parsePoints(text: string, units: PasteUnits = {}): ParsedPoints {
  const out: ParsedPoints = { points: [], lines: [], problems: [], note: null };
  if (!text.trim()) {
    out.problems.push({ field: "data", message: "Paste at least 3 rows of time and measured value." });
    return out;
  }
  const layout = detectLayout(text);
  const { rows, sep, decimal } = layout;
  const first = rows.findIndex((r) => r.length > 0);
  const dataRows = rows.map((cells, i) => ({ cells, line: i + 1 })).filter((r, i) => r.cells.length > 0 && !(layout.header && i === first));
  const headerCells = layout.header ? rows[first] : null;
  const widths = dataRows.map((r) => r.cells.length);

  // Commas that are both decimal marks and separators cannot be told apart: say so once
  // (in the same words as an uploaded CSV file, app/lib/readings/decimal-comma.ts).
  const splitDecimals =
    sep === "," &&
    dataRows.length > 0 &&
    ((headerCells !== null && Math.min(...widths) > headerCells.length) ||
      dataRows.every((r) => r.cells.length >= 3 && /^\d+$/.test(r.cells[1]) && /^\d+$/.test(r.cells[2])) ||
      (new Set(widths).size > 1 && Math.max(...widths) > 3));
  if (splitDecimals) {
    out.problems.push({ field: "data", message: splitDecimalMessage(dataRows[0], "line") });
    return out;
  }
  if (layout.score === 0 && dataRows.length > SAME_PROBLEM_LINES) {
    const oneColumn = dataRows.every((r) => r.cells.length < 2);
    out.problems.push({
      field: "data",
      message: oneColumn
        ? "Every line has one column: put the time and the value on each line, separated by a tab, semicolon, comma or space."
        : "No line has a number in both its first and its second column: the first column must be the time and the second the measured value.",
    });
    return out;
  }

  const grouped = new Map<string, { lines: number[]; whole: (lines: number[]) => string; single: string[] }>();
  const problem = (key: string, line: number, single: string, whole: (lines: number[]) => string) => {
    const g = grouped.get(key) ?? { lines: [], whole, single: [] };
    g.lines.push(line);
    g.single.push(single);
    grouped.set(key, g);
  };
  const hint = (raw: string) =>
    decimal === "." && raw.includes(",") ? " (use a point as the decimal mark)" : decimal === "," && raw.includes(".") ? " (the other lines use a decimal comma)" : "";
  const unitProblem = (cell: { unit: string | null }, column: 1 | 2, line: number, raw: string): boolean => {
    if (!cell.unit) return false;
    const u = cell.unit.toLowerCase();
    if (column === 1) {
      const found = TIME_UNITS_IN_CELLS[u];
      if (found && (!units.time || found === units.time)) return false;
      const why = found ? `is in ${found}, but the form says the data's time unit is ${units.time}` : `has the unit "${cell.unit}", which is not a time unit (s, min or h)`;
      problem(`unit1:${u}`, line, `Line ${line}, column 1 (time): "${raw}" ${why}.`, (ls) => `Column 1 (time) ${why}, on ${ls.length} lines (${lineList(ls)}).`);
      return true;
    }
    const concentration = units.kind === undefined || units.kind === "concentrationA" || units.kind === "concentrationB";
    const found = CONCENTRATION_UNITS_IN_CELLS[u];
    if (concentration && found && (!units.concentration || found === units.concentration)) return false;
    const why =
      concentration && found
        ? `is in ${found}, but the form's concentration unit is ${units.concentration}`
        : `has the unit "${cell.unit}": give the value as a plain number in the unit the form names`;
    problem(`unit2:${u}`, line, `Line ${line}, column 2 (value): "${raw}" ${why}.`, (ls) => `Column 2 (value) ${why}, on ${ls.length} lines (${lineList(ls)}).`);
    return true;
  };

  for (const { cells, line } of dataRows) {
    if (cells.length < 2) {
      problem("one-column", line, `Line ${line}: expected two columns (time, value), found one: "${cells[0]}".`, (ls) => `${ls.length} lines have only one column (${lineList(ls)}): each line needs a time and a value.`);
      continue;
    }
    const t = readCell(cells[0], decimal);
    const v = readCell(cells[1], decimal);
    if (!t) problem("nan1", line, `Line ${line}, column 1 (time): "${cells[0]}" is not a number${hint(cells[0])}.`, (ls) => `Column 1 (time) is not a number on ${ls.length} lines (${lineList(ls)}), for example "${cells[0]}".`);
    if (!v) problem("nan2", line, `Line ${line}, column 2 (value): "${cells[1]}" is not a number${hint(cells[1])}.`, (ls) => `Column 2 (value) is not a number on ${ls.length} lines (${lineList(ls)}), for example "${cells[1]}".`);
    if (!t || !v) continue;
    const badUnits = [unitProblem(t, 1, line, cells[0]), unitProblem(v, 2, line, cells[1])].some(Boolean);
    if (badUnits) continue;
    out.points.push([t.value, v.value]);
    out.lines.push(line);
  }
  for (const g of grouped.values()) {
    if (g.lines.length > SAME_PROBLEM_LINES) out.problems.push({ field: "data", message: g.whole(g.lines) });
    else for (const m of g.single) out.problems.push({ field: "data", message: m });
  }

  const columnName = (i: number) => `column ${i + 1}${headerCells?.[i] ? ` ("${headerCells[i]}")` : ""}`;
  const widest = Math.max(...widths);
  const unused = widest > 2 ? `; ${widest === 3 ? columnName(2) : `columns 3 to ${widest}`} not used` : "";
  out.note =
    `Read ${out.points.length} reading${out.points.length === 1 ? "" : "s"}: columns separated by ${SEPARATOR_NAME[sep]}, decimal ${decimal === "," ? "comma" : "point"}` +
    `${layout.header ? `, line ${first + 1} taken as a header` : ""}; ${columnName(0)} as the time and ${columnName(1)} as the value${unused}.`;
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
export function buildFitRequest(values: FitFormValues): { request: Record<string, unknown>; lines: number[]; problems: FormProblem[]; note: string | null } {
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
  const parsed = parsePoints(values.data, { time: values.timeUnit, concentration: values.concentrationUnit, kind: values.kind });
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
  return { request, lines: parsed.lines, problems, note: parsed.note };
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

/** The engine's field names, as the form labels them, for messages shown beside the form. */
const FORM_WORDS: Array<[RegExp, string]> = [
  [/\breference\.EaKJ\b|\bEaKJ\b/g, "the activation energy"],
  [/\breference\.TrefC\b|\bTrefC\b/g, "Tref"],
  [/\breference\.tolerancePct\b|\btolerancePct\b/g, "the tolerance"],
  [/\breference\.k\b/g, "the reference k"],
  [/\btemperatureC\b/g, "the run temperature"],
  [/\bunits\.time\b/g, "the time unit of the data"],
  [/\bunits\.concentration\b/g, "the concentration unit"],
  [/\bmeasurement\.Sinf\b|\bSinf\b/g, "S∞"],
  [/\bmeasurement\.S0\b/g, "S0"],
  [/\bmeasurement\.epsilon\b|\bepsilon\b/g, "the molar absorptivity"],
  [/\bmeasurement\.pathCm\b|\bpathCm\b/g, "the path length"],
  [/\bmeasurement\.baseline\b/g, "the baseline absorbance"],
  [/\bfeed\.CA0\b/g, "CA0"],
  [/\bfeed\.CB0\b/g, "CB0"],
  [/\breaction\.a\b/g, "a"],
  [/\breaction\.b\b/g, "b"],
  [/\borderA\b|\borderB\b/g, "the rate law"],
  [/(\d) C\b/g, "$1 °C"],
];

export function formWords(message: string): string {
  return styleNumbers(FORM_WORDS.reduce((m, [pattern, label]) => m.replace(pattern, label), message));
}

/** Places an engine error (path + message) on the form; data rows are named by pasted line. */
export function problemFromEnginePath(path: string, rawMessage: string, lines: number[]): FormProblem {
  const message = formWords(rawMessage);
  const point = /^points\[(\d+)\](?:\[(\d)\])?$/.exec(path);
  if (point) {
    const line = lines[Number(point[1])] ?? Number(point[1]) + 1;
    const column = point[2] === undefined ? "" : point[2] === "0" ? ", column 1 (time)" : ", column 2 (value)";
    return { field: "data", message: `Line ${line}${column}: ${message}` };
  }
  if (path === "points") return { field: "data", message: `Data: ${message}` };
  const field = PATH_FIELDS[path];
  return field ? { field, message: capitalise(message) } : { field: "data", message: capitalise(message) };
}

function capitalise(s: string) {
  return s ? s[0].toUpperCase() + s.slice(1) : s;
}
