// What a group reads about its run: the engine's flags rewritten for students, with the rows
// named as they are in the uploaded file, and the two checks in words. Never names the
// reference value or the tolerance (those stay with the staff).
import type { Flag } from "../kinetics/index.ts";
import type { CheckScore } from "./marks.ts";

/** The straight-line forms a group may say it plotted (the engine's own names), and the others. */
export const REPORTED_METHODS: Record<string, string> = {
  "ln(CA0/CA)": "ln(CA0/CA) against t (first order)",
  "1/CA - 1/CA0": "1/CA − 1/CA0 against t (second order, or equal feed)",
  "ln[(CB*CA0)/(CB0*CA)]": "ln[(CB·CA0)/(CB0·CA)] against t (unequal feed)",
  "curve-fit": "a curve fitted to CA against t",
  other: "something else",
};

export function methodText(method: string): string {
  return (REPORTED_METHODS[method] ?? method).replace(/\*/g, "·");
}

function rowsText(rows: readonly number[], rowNumbers: readonly number[]): string {
  if (!rows.length) return "";
  const named = rows.slice(0, 8).map((r) => rowNumbers[r] ?? r + 1);
  return `${rows.length === 1 ? "row" : "rows"} ${named.join(", ")}${rows.length > 8 ? ", …" : ""} of your file`;
}

const SLIP_HINT = /perhaps ([^.]+)\./;

/** One line per flag, in words for a group. `rowNumbers[i]` is the file row of point i. */
export function flagFeedback(flag: Flag & { refit?: { k?: number } }, rowNumbers: readonly number[]): string {
  const where = rowsText(flag.rows, rowNumbers);
  switch (flag.code) {
    case "unit-slip": {
      const hint = SLIP_HINT.exec(flag.message)?.[1] ?? "a unit slip";
      return `Your rate constant is off from what your bench's conditions give by about a unit-conversion factor: perhaps ${hint}. Check the time and concentration units of your columns.`;
    }
    case "order-mismatch":
    case "curvature":
      return `Your readings bend away from the straight line this rate law predicts${where ? ` (most clearly in ${where})` : ""}. Check the start time, the temperature control and whether the plot you drew is the right one for your feed.`;
    case "low-conversion":
      return `Too little of the limiting reagent had reacted by your last reading for a reliable rate constant (${flag.message.match(/about (\d+) %/)?.[1] ?? "under 20"} %). Take readings for longer next time.`;
    case "few-points":
      return `Your file has too few usable readings for a trustworthy rate constant; take more readings across the run.`;
    case "time-order":
      return `Some times are out of order or repeated (${where}). Check the time column.`;
    case "beyond-asymptote":
      return `Some readings (${where}) are at or past the value the reaction can reach, so they cannot go on the straight line; check them.`;
    case "straight-line-bias":
      return `The straight-line transform magnifies the noise in some of your readings (often near the end of the run); a curve fit gives a steadier k.`;
    case "fit-not-converged":
      return `Your readings show too little change to fit a rate constant reliably.`;
    default: {
      const code = flag.code as string;
      if (code === "outlier") return `${where ? capitalise(where) : "One reading"} sits far from the curve through the others: a wild reading (a misread scale, a bubble, a typing slip). Check it in your lab book.`;
      if (code === "fits-disagree") return `The straight line and the curve through your readings give clearly different rate constants: some readings (often the last ones) carry more weight on the straight line than they deserve. Check them.`;
      if (code === "feed-mismatch") return `Your first readings do not match the feed your bench was given: check that you used your own bench's solutions and the right concentration unit.`;
      return flag.message;
    }
  }
}

function capitalise(s: string) {
  return s[0].toUpperCase() + s.slice(1);
}

export interface FeedbackInput {
  flags: Array<Flag & { refit?: { k?: number } }>;
  rowNumbers: readonly number[];
  experiment: CheckScore;
  analysis: CheckScore;
  reportedK: number | null;
  reportedMethod: string | null;
  /** the straight line that fits this bench's feed (engine's form name) */
  expectedForm: string;
  late: boolean;
  excludedRows: readonly number[];
  /** the readings' values in the time order of the file (for the constant-readings check) */
  values?: readonly number[];
  /** what the reported k was judged against (default the straight line) */
  analysisAgainst?: "line" | "curve";
}

/** Flags that a unit slip or feed mismatch explains by itself: one cause, one line. */
const EXPLAINED_BY_UNITS = new Set(["low-conversion", "fit-not-converged", "straight-line-bias", "fits-disagree"]);

/**
 * Readings that hardly change from first to last (a probe left in air, a reaction never started):
 * the spread within 2 % of their size (common practice, no source).
 */
export function constantReadings(values: readonly number[] | undefined): boolean {
  if (!values || values.length < 4) return false;
  const max = Math.max(...values);
  const min = Math.min(...values);
  const size = Math.max(Math.abs(max), Math.abs(min));
  return size === 0 || (max - min) <= 0.02 * size;
}

/**
 * A reported k that is a unit factor away from the group's own line: 60 (or 1/60) is minutes
 * against seconds; 1000 (or 1/1000) is mmol/L against mol/L, which changes k only where k carries
 * a concentration unit (second order, L/(mol·s); a first-order k is per second whatever the
 * concentration unit). Within 10 % of the factor (common practice, no source).
 */
function unitFactorHint(analysis: CheckScore, expectedForm: string): string | null {
  const ratio = 1 + analysis.deviationPct / 100;
  if (!Number.isFinite(ratio) || ratio <= 0) return null;
  const near = (factor: number) => Math.abs(ratio / factor - 1) < 0.1;
  if (near(60)) return "Your reported k is about 60 times the slope of your own straight line: it looks like a k per minute where k per second was asked for. Divide it by 60 (or plot against time in seconds).";
  if (near(1 / 60)) return "Your reported k is about 1/60 of the slope of your own straight line: it looks like your times were in seconds while the k was taken per minute, or the reverse. Multiply it by 60 if your slope was per minute.";
  if (expectedForm === "ln(CA0/CA)") return null;
  if (near(1 / 1000)) return "Your reported k is about 1/1000 of the slope of your own straight line: it looks like a k in L/(mmol·s), from concentrations plotted in mmol/L, where L/(mol·s) was asked for. Multiply it by 1000 (or plot with concentrations in mol/L).";
  if (near(1000)) return "Your reported k is about 1000 times the slope of your own straight line: it looks like concentrations in mol/L were divided by 1000 once more, or the k was taken per mmol/L the wrong way round. Check the concentration unit in your plot; k is asked for in L/(mol·s).";
  return null;
}

/** Feedback lines for the group: flags first, then what each check found. */
export function feedbackLines(input: FeedbackInput): string[] {
  const codes = new Set(input.flags.map((f) => f.code as string));
  const constant = constantReadings(input.values);
  const unitsExplain = !constant && (codes.has("unit-slip") || codes.has("feed-mismatch"));
  const lines: string[] = [];
  if (constant) {
    const v = input.values!;
    lines.push(`Your readings hardly change from first to last (${Number(v[0].toPrecision(3))} to ${Number(v[v.length - 1].toPrecision(3))}): the probe may have been out of the solution, or the reaction never started. Check the set-up and repeat the run; no rate constant can come from these readings.`);
  }
  for (const f of input.flags) {
    const code = f.code as string;
    // constant readings are one cause: no unit slip, no feed mismatch, no "too little change"
    if (constant && (code === "unit-slip" || code === "feed-mismatch" || EXPLAINED_BY_UNITS.has(code))) continue;
    if (unitsExplain && EXPLAINED_BY_UNITS.has(code)) continue;
    lines.push(flagFeedback(f, input.rowNumbers));
  }
  if (input.reportedMethod && input.reportedMethod in REPORTED_METHODS && input.reportedMethod !== "curve-fit" && input.reportedMethod !== "other" && input.reportedMethod !== input.expectedForm) {
    lines.push(`For your bench's feed the straight line is ${methodText(input.expectedForm)}; you used ${methodText(input.reportedMethod)}, so your k is not the slope this rate law gives.`);
  }
  if (input.reportedK === null) lines.push("You did not report a rate constant of your own, so the analysis check scored nothing.");
  else if (input.analysisAgainst === "curve") {
    lines.push(input.analysis.band === "full"
      ? "Your reported k matches a curve fitted to your own readings, as you said you made it."
      : `Your reported k differs from a curve fitted to your own readings (the method you named) by ${Math.abs(input.analysis.deviationPct).toFixed(1)} %: check your fit.`);
  } else if (input.analysis.band === "full") lines.push("Your reported k matches the straight line through your own readings.");
  else lines.push(unitFactorHint(input.analysis, input.expectedForm) ?? `Your reported k differs from the straight line through your own readings by ${Math.abs(input.analysis.deviationPct).toFixed(1)} %: check the slope and the plot you used.`);
  lines.push(
    input.experiment.band === "full"
      ? "Your rate constant agrees with the expected value for your bench's temperature."
      : input.experiment.band === "partial"
        ? "Your rate constant is near the expected value for your bench's temperature, but not within the band for full marks."
        : "Your rate constant is far from the expected value for your bench's temperature.",
  );
  if (input.excludedRows.length) lines.push(`A reviewer left out ${rowsText(input.excludedRows.map((_, i) => i), input.excludedRows)} and marked the rest.`);
  if (input.late) lines.push("Submitted after the deadline: the late penalty was applied.");
  return lines;
}
