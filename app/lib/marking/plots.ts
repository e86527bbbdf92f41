// The three plots of a run, as point lists for XYPlot: the readings with the fitted curve, the
// straight line the group would draw (textbook form against t, with the fitted line), and the
// residuals of the curve fit. Pure; the fit may have been thinned (see trimFit), which keeps the
// rows it kept in `line.rows` and `nonlinear.residualRows`.
import type { FitResult } from "../kinetics/index.ts";
import { secondsPer, type TimeUnit } from "../kinetics/units.ts";
import { handLineK } from "./engine-result.ts";

export interface RunPlots {
  /** `rows`: the file row of each point (the plots' tooltips), when the caller knows them */
  readings: { points: Array<[number, number]>; curve: Array<[number, number]>; rows?: number[] };
  line: { points: Array<[number, number]>; curve: Array<[number, number]>; yLabel: string; rows?: number[] };
  residuals: Array<[number, number]>;
  residualFileRows?: number[];
  /** CA against t from the fitted model (the request's concentration unit) */
  concentration: Array<[number, number]>;
}

const MAX_PLOT_POINTS = 400;

function thinned<T>(xs: T[]): T[] {
  if (xs.length <= MAX_PLOT_POINTS) return xs;
  const step = xs.length / MAX_PLOT_POINTS;
  return Array.from({ length: MAX_PLOT_POINTS }, (_, i) => xs[Math.floor(i * step)]);
}

/**
 * `points` are the readings the engine was given (after exclusions), in the request's units;
 * `fileRows[i]` the file row of points[i] (optional: then the plots carry no row tooltips).
 */
export function runPlots(fit: FitResult, points: Array<[number, number]>, fileRows?: readonly number[]): RunPlots {
  const ts = secondsPer(fit.units.time as TimeUnit);
  // the hand-method line: its slope, intercept and residuals belong together
  const k = handLineK(fit);
  const factor = fit.line.slopeFactor;
  const b = fit.line.intercept;
  const linePoints: Array<[number, number]> = [];
  const lineRows: number[] = [];
  fit.line.rows.forEach((row, i) => {
    const p = points[row];
    if (!p) return;
    const y = factor * (b + k * p[0] * ts + fit.line.residuals[i]);
    linePoints.push([p[0], y]);
    lineRows.push(fileRows?.[row] ?? row + 1);
  });
  let tMax = 0;
  for (const p of points) tMax = Math.max(tMax, p[0]);
  const lineCurve: Array<[number, number]> = Number.isFinite(k) && Number.isFinite(b) ? [[0, factor * b], [tMax, factor * (b + k * tMax * ts)]] : [];
  const residualRows = (fit.nonlinear as { residualRows?: number[] }).residualRows ?? fit.nonlinear.residuals.map((_, i) => i);
  const residuals: Array<[number, number]> = [];
  const residualFileRows: number[] = [];
  residualRows.forEach((row, i) => {
    const p = points[row];
    if (p && Number.isFinite(fit.nonlinear.residuals[i])) {
      residuals.push([p[0], fit.nonlinear.residuals[i]]);
      residualFileRows.push(fileRows?.[row] ?? row + 1);
    }
  });
  const withRows = fileRows !== undefined;
  return {
    readings: { points: thinned(points), curve: fit.curve.t.map((t, i) => [t, fit.curve.value[i]]), ...(withRows ? { rows: thinned(points.map((_, i) => fileRows[i] ?? i + 1)) } : {}) },
    line: { points: thinned(linePoints), curve: lineCurve, yLabel: `${fit.line.form.replace(/\*/g, "·")}${fit.model === "first-order" ? " (–)" : fit.model === "second-order-AB-unequal" ? " (–)" : ` / (L/mol)`}`, ...(withRows ? { rows: thinned(lineRows) } : {}) },
    residuals: thinned(residuals),
    ...(withRows ? { residualFileRows: thinned(residualFileRows) } : {}),
    concentration: fit.curve.t.map((t, i) => [t, fit.curve.CA[i]]),
  };
}
