// Axes that follow the points that matter: the class Arrhenius plot is scaled to the benches in
// the fit (and the fitted line), so one wild bench left out of the fit no longer flattens the rest.
// A point outside that box is drawn on its edge with a marker saying which way it lies. Pure.

export type Side = "above" | "below" | "left" | "right" | null;

/** The [min, max] of finite values, widened a little so no point sits on the frame; null when none. */
export function span(values: readonly number[], pad = 0.05): [number, number] | null {
  const v = values.filter(Number.isFinite);
  if (!v.length) return null;
  let lo = Math.min(...v);
  let hi = Math.max(...v);
  if (lo === hi) {
    const d = Math.abs(lo) * 0.05 || 1;
    lo -= d;
    hi += d;
  }
  const p = (hi - lo) * pad;
  return [lo - p, hi + p];
}

/** A point moved onto the edge of the box [x0, x1] × [y0, y1] when it lies outside, and where it lies. */
export function toEdge(p: readonly [number, number], x: readonly [number, number], y: readonly [number, number]): { at: [number, number]; side: Side } {
  const cx = Math.min(Math.max(p[0], x[0]), x[1]);
  const cy = Math.min(Math.max(p[1], y[0]), y[1]);
  const side: Side = p[1] > y[1] ? "above" : p[1] < y[0] ? "below" : p[0] < x[0] ? "left" : p[0] > x[1] ? "right" : null;
  return { at: [cx, cy], side };
}
