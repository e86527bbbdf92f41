// Plot data and labels for a stored version, built on the server (pages render SVG from it).
import type { FitResult } from "~/lib/kinetics";
import { runPlots, type RunPlots } from "~/lib/marking/plots";
import type { Submission } from "../db/submissions.server";

/** The readings the engine was given for this version (stored readings less exclusions). */
export function fittedPoints(s: Submission): Array<[number, number]> {
  if (!s.readings) return [];
  const excluded = new Set((s.excluded ?? []).map((e) => e.row));
  return s.readings.points.filter((_, i) => !excluded.has(s.readings!.rowNumbers[i]));
}

/** The file row of each reading the engine was given (same order as fittedPoints). */
export function fittedRowNumbers(s: Submission): number[] {
  if (!s.readings) return [];
  const excluded = new Set((s.excluded ?? []).map((e) => e.row));
  return s.readings.rowNumbers.filter((r) => !excluded.has(r));
}

export function plotsOf(s: Submission, fit: FitResult | null): RunPlots | null {
  if (!fit || !s.readings) return null;
  return runPlots(fit, fittedPoints(s), fittedRowNumbers(s));
}

export function valueLabel(s: Submission): string {
  const v = s.readings?.value;
  if (s.measured === "concentrationA") return `CA / (${s.concentrationUnit})`;
  if (v?.header) return v.header;
  return s.measured;
}
