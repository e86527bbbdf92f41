// A small SVG plot: measured points, an optional model curve, an optional zero line (residuals),
// and optionally a second set of points drawn as crosses and a dashed second line (class results:
// benches left out of a fit, the reference line).
// Axes carry the quantity and unit; a caption says what the marks are, so colour is not needed.
// The SVG is drawn at the width it is shown at (measured in the browser), so its text stays at
// 11 px and more on a phone instead of shrinking with a scaled-down picture.
import { useEffect, useRef, useState } from "react";
import { scaleLinear } from "d3-scale";
import { sig } from "~/lib/format";

export interface XYPlotProps {
  title: string;
  xLabel: string;
  yLabel: string;
  points: Array<[number, number]>;
  curve?: Array<[number, number]>;
  zeroLine?: boolean;
  height?: number;
  /** a second set of points, drawn as crosses */
  crosses?: Array<[number, number]>;
  /** a second line, dashed */
  dashed?: Array<[number, number]>;
  /** what each mark stands for, in the caption (defaults: measured points, the fitted model) */
  legend?: { points?: string; curve?: string; crosses?: string; dashed?: string };
  /** a tooltip per point (same order as `points`), e.g. the reading's row in the file */
  pointLabels?: string[];
  /** a tooltip per cross (same order as `crosses`) */
  crossLabels?: string[];
}

const DEFAULT_WIDTH = 640;
const MAX_WIDTH = 768;
const TICK_PX = 12;
const LABEL_PX = 13;

function extent(values: number[]): [number, number] {
  const finite = values.filter(Number.isFinite);
  if (!finite.length) return [0, 1];
  let lo = Math.min(...finite);
  let hi = Math.max(...finite);
  if (lo === hi) {
    const pad = Math.abs(lo) * 0.1 || 1;
    lo -= pad;
    hi += pad;
  }
  return [lo, hi];
}

function useWidth<T extends HTMLElement>() {
  const ref = useRef<T>(null);
  const [width, setWidth] = useState(DEFAULT_WIDTH);
  useEffect(() => {
    const el = ref.current;
    if (!el || typeof ResizeObserver === "undefined") return;
    const observer = new ResizeObserver(([entry]) => setWidth(Math.max(240, Math.min(MAX_WIDTH, Math.floor(entry.contentRect.width)))));
    observer.observe(el);
    return () => observer.disconnect();
  }, []);
  return [ref, width] as const;
}

export function XYPlot({ title, xLabel, yLabel, points, curve = [], zeroLine = false, height = 300, crosses = [], dashed = [], legend = {}, pointLabels, crossLabels }: XYPlotProps) {
  const [box, W] = useWidth<HTMLDivElement>();
  const all = [...points, ...curve, ...crosses, ...dashed].filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]));
  const ys = all.map((p) => p[1]);
  if (zeroLine) ys.push(0);
  const yScale = scaleLinear().domain(extent(ys)).nice();
  const yTicks = yScale.ticks(height < 250 ? 4 : 5);
  // Room on the left for the longest tick text and the rotated axis label.
  const tickChars = Math.max(...yTicks.map((t) => sig(t, 3).length), 1);
  const M = { top: 12, right: 16, bottom: 46, left: Math.ceil(tickChars * TICK_PX * 0.6) + 12 + LABEL_PX + 10 };
  const x = scaleLinear().domain(extent(all.map((p) => p[0]))).nice().range([M.left, W - M.right]);
  const y = yScale.range([height - M.bottom, M.top]);
  const pathOf = (line: Array<[number, number]>) =>
    line
      .filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]))
      .map((p, i) => `${i ? "L" : "M"}${x(p[0]).toFixed(1)},${y(p[1]).toFixed(1)}`)
      .join("");
  const path = pathOf(curve);
  const dashedPath = pathOf(dashed);
  const shownCrosses = crosses.filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]));
  const xTickCount = Math.max(2, Math.floor((W - M.left - M.right) / 70));
  return (
    <figure className="my-4 max-w-3xl" ref={box}>
      <svg width={W} height={height} viewBox={`0 0 ${W} ${height}`} role="img" aria-label={title} className="block max-w-full bg-white">
        {yTicks.map((t) => (
          <g key={`y${t}`}>
            <line x1={M.left} x2={W - M.right} y1={y(t)} y2={y(t)} stroke="#e4e1da" />
            <text x={M.left - 6} y={y(t)} textAnchor="end" dominantBaseline="middle" fontSize={TICK_PX} className="tabular-nums">{sig(t, 3)}</text>
          </g>
        ))}
        {x.ticks(xTickCount).map((t) => (
          <text key={`x${t}`} x={x(t)} y={height - M.bottom + 17} textAnchor="middle" fontSize={TICK_PX}>{sig(t, 3)}</text>
        ))}
        <line x1={M.left} x2={M.left} y1={M.top} y2={height - M.bottom} stroke="#1d2125" />
        <line x1={M.left} x2={W - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke="#1d2125" />
        {zeroLine ? <line x1={M.left} x2={W - M.right} y1={y(0)} y2={y(0)} stroke="#1d2125" strokeDasharray="4 3" /> : null}
        {dashedPath ? <path d={dashedPath} fill="none" stroke="#8a4b08" strokeWidth="2" strokeDasharray="7 4" data-series="dashed" /> : null}
        {path ? <path d={path} fill="none" stroke="#0b6170" strokeWidth="2" data-series="curve" /> : null}
        {points.map((p, i) => Number.isFinite(p[1]) ? (
          <circle key={i} cx={x(p[0])} cy={y(p[1])} r="3.5" fill="none" stroke="#1d2125" strokeWidth="1.5" data-series="points">{pointLabels?.[i] ? <title>{pointLabels[i]}</title> : null}</circle>
        ) : null)}
        {crosses.map((p, i) => Number.isFinite(p[0]) && Number.isFinite(p[1]) ? (
          <path key={`c${i}`} d={`M${(x(p[0]) - 4.5).toFixed(1)},${(y(p[1]) - 4.5).toFixed(1)}l9,9m0,-9l-9,9`} fill="none" stroke="#a3261b" strokeWidth="2" data-series="crosses">{crossLabels?.[i] ? <title>{crossLabels[i]}</title> : null}</path>
        ) : null)}
        <text x={(M.left + W - M.right) / 2} y={height - 8} textAnchor="middle" fontSize={LABEL_PX} fontWeight="bold">{xLabel}</text>
        <text transform={`translate(${LABEL_PX + 2} ${(M.top + height - M.bottom) / 2}) rotate(-90)`} textAnchor="middle" fontSize={LABEL_PX} fontWeight="bold">{yLabel}</text>
      </svg>
      <figcaption className="text-sm text-ink-soft">
        {title}: open circles are {legend.points ?? "measured points"}{shownCrosses.length ? `; crosses are ${legend.crosses ?? "other points"}` : ""}{path ? `; the solid line is ${legend.curve ?? "the fitted model"}` : ""}{dashedPath ? `; the long-dashed line is ${legend.dashed ?? "a second line"}` : ""}{zeroLine ? "; the dashed line is zero" : ""}.
      </figcaption>
    </figure>
  );
}
