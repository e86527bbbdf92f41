// The range checks a readings file must pass before it is stored for marking, in the group's
// words and the file's own rows. The same checks run when the file arrives (a refusal, 422) and in
// the marking job (so a version stored before them still fails with the same message, never
// silently). The engine's own request checks (validateFitRequest: a concentration below zero by
// more than reading noise, an absorbance no spectrometer reads, ...) come with the engine's
// message; before them two mistakes of kind the engine cannot name:
// - conversion (fraction or percent) sent as a concentration: the readings rise, while A (or B)
//   can only fall as it reacts (common practice, no source);
// - percent transmittance sent as absorbance: values far above 4, where no spectrometer reads
//   absorbance, and within 0-100 (A = 2 - log10(%T), Beer-Lambert; from memory).
import type { FitRequest } from "../kinetics/index.ts";

export interface EngineError {
  path: string;
  message: string;
}

/** How the time and value columns are named in messages: "column B (CA)". */
export interface ColumnNames {
  time?: string;
  value?: string;
}

const fmt = (x: number) => Number(x.toPrecision(3)).toString();

function timeOrder(points: [number, number][]): number[] {
  return points.map((_, i) => i).sort((a, b) => points[a][0] - points[b][0]);
}

/** A reading-kind mistake (conversion as concentration, %T as absorbance), or null. */
export function readingKindProblem(request: FitRequest, rowNumbers: readonly number[], columns: ColumnNames = {}): string | null {
  const points = request.points as [number, number][];
  if (!Array.isArray(points) || points.length < 4 || !points.every((p) => Array.isArray(p) && Number.isFinite(p[0]) && Number.isFinite(p[1]))) return null;
  const order = timeOrder(points);
  const values = order.map((i) => points[i][1]);
  const column = columns.value ?? "the reading column";
  const kind = request.measurement.kind;
  const unit = request.units.concentration;
  const rowOf = (k: number) => rowNumbers[order[k]] ?? order[k] + 1;
  if (kind === "concentrationA" || kind === "concentrationB") {
    const n = values.length;
    const m = Math.max(2, Math.floor(n / 5));
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    const head = mean(values.slice(0, m));
    const tail = mean(values.slice(n - m));
    const top = Math.max(...values.map(Math.abs));
    let up = 0;
    let down = 0;
    for (let i = 1; i < n; i++) {
      if (values[i] > values[i - 1]) up++;
      else if (values[i] < values[i - 1]) down++;
    }
    const rises = top > 0 && tail - head > 0.05 * top && up >= 0.6 * (up + down);
    if (!rises) return null;
    const species = kind === "concentrationA" ? "A" : "B";
    const feed = kind === "concentrationA" ? request.feed.CA0 : request.feed.CB0;
    const max = Math.max(...values);
    const min = Math.min(...values);
    const span = `rise from ${fmt(values[0])} (row ${rowOf(0)}) to ${fmt(values[n - 1])} (row ${rowOf(n - 1)})`;
    const falls = `, but the concentration of ${species} can only fall as ${species} reacts`;
    if (min >= -0.05 && max <= 1.05 && values[0] <= 0.1 * max) {
      return `The readings in ${column} ${span}${falls}: they look like the conversion of ${species} as a fraction (0 to 1), not a concentration. Send C${species} = C${species}0·(1 − X) (C${species}0 = ${fmt(feed ?? NaN)} ${unit} for your bench), or choose the column that holds the concentration.`;
    }
    if (min >= -5 && max <= 105 && values[0] <= 0.1 * max) {
      return `The readings in ${column} ${span}${falls}: they look like the conversion of ${species} in percent (0 to 100), not a concentration. Send C${species} = C${species}0·(1 − X/100) (C${species}0 = ${fmt(feed ?? NaN)} ${unit} for your bench), or choose the column that holds the concentration.`;
    }
    return `The readings in ${column} ${span}${falls}: is this a product's concentration or a signal that grows? Choose the column that holds the concentration of ${species}, or say what the column holds.`;
  }
  if (kind === "absorbance") {
    const max = Math.max(...values);
    const min = Math.min(...values);
    if (max > 4 && max <= 100.5 && min >= -0.5) {
      const at = values.indexOf(max);
      return `The readings in ${column} run from ${fmt(min)} to ${fmt(max)} (row ${rowOf(at)}): an absorbance above about 4 cannot be read, so these look like percent transmittance (%T), not absorbance. Convert each reading to absorbance, A = 2 − log10(%T), or export the absorbance column.`;
    }
  }
  return null;
}

/**
 * Engine request errors as one message in the file's rows: "Row 6 of the file, column B (CA): a
 * concentration cannot be negative (…). The same in 4 more rows: 7, 8, 9, 10."
 */
export function engineErrorsText(errors: readonly EngineError[], rowNumbers: readonly number[], columns: ColumnNames = {}): string {
  const placed = errors.map((e) => {
    const m = /^points\[(\d+)\](?:\[(0|1)\])?$/.exec(e.path);
    if (!m) return { row: null as number | null, where: e.path, message: e.message };
    const row = rowNumbers[Number(m[1])] ?? Number(m[1]) + 1;
    const col = m[2] === "0" ? columns.time : m[2] === "1" ? columns.value : undefined;
    return { row, where: `Row ${row} of the file${col ? `, ${col}` : ""}`, message: e.message };
  });
  const first = placed[0];
  if (!first) return "";
  const kindOf = (s: string) => s.replace(/[-+]?\d[\d.eE+-]*/g, "#");
  const same = placed.slice(1).filter((p) => p.row !== null && kindOf(p.message) === kindOf(first.message));
  const others = placed.slice(1).filter((p) => !same.includes(p));
  let text = `${first.where}: ${first.message}`;
  if (same.length) text += `. The same in ${same.length} more row${same.length > 1 ? "s" : ""}: ${same.slice(0, 8).map((p) => p.row).join(", ")}${same.length > 8 ? ", …" : ""}`;
  for (const o of others.slice(0, 3)) text += `. ${o.where}: ${o.message}`;
  return text.endsWith(".") ? text : `${text}.`;
}
