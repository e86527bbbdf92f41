// A small SVG plot: measured points, an optional model curve, an optional zero line (residuals).
// Axes carry the quantity and unit; a caption says what the marks are, so colour is not needed.
import { scaleLinear } from "d3-scale";

export interface XYPlotProps {
  title: string;
  xLabel: string;
  yLabel: string;
  points: Array<[number, number]>;
  curve?: Array<[number, number]>;
  zeroLine?: boolean;
  height?: number;
}

const W = 640;
const M = { top: 12, right: 16, bottom: 44, left: 72 };

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

function tickText(x: number) {
  if (x === 0) return "0";
  const a = Math.abs(x);
  return a >= 1e4 || a < 1e-3 ? x.toExponential(1) : String(Number(x.toPrecision(4)));
}

export function XYPlot({ title, xLabel, yLabel, points, curve = [], zeroLine = false, height = 300 }: XYPlotProps) {
  const all = [...points, ...curve];
  const ys = all.map((p) => p[1]);
  if (zeroLine) ys.push(0);
  const x = scaleLinear().domain(extent(all.map((p) => p[0]))).nice().range([M.left, W - M.right]);
  const y = scaleLinear().domain(extent(ys)).nice().range([height - M.bottom, M.top]);
  const path = curve
    .filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]))
    .map((p, i) => `${i ? "L" : "M"}${x(p[0]).toFixed(1)},${y(p[1]).toFixed(1)}`)
    .join("");
  return (
    <figure className="my-4">
      <svg viewBox={`0 0 ${W} ${height}`} role="img" aria-label={title} className="w-full max-w-3xl bg-white">
        {y.ticks(5).map((t) => (
          <g key={`y${t}`}>
            <line x1={M.left} x2={W - M.right} y1={y(t)} y2={y(t)} stroke="#e4e1da" />
            <text x={M.left - 6} y={y(t)} textAnchor="end" dominantBaseline="middle" fontSize="11" className="tabular-nums">{tickText(t)}</text>
          </g>
        ))}
        {x.ticks(6).map((t) => (
          <text key={`x${t}`} x={x(t)} y={height - M.bottom + 16} textAnchor="middle" fontSize="11">{tickText(t)}</text>
        ))}
        <line x1={M.left} x2={M.left} y1={M.top} y2={height - M.bottom} stroke="#1d2125" />
        <line x1={M.left} x2={W - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke="#1d2125" />
        {zeroLine ? <line x1={M.left} x2={W - M.right} y1={y(0)} y2={y(0)} stroke="#1d2125" strokeDasharray="4 3" /> : null}
        {path ? <path d={path} fill="none" stroke="#0b6170" strokeWidth="2" /> : null}
        {points.filter((p) => Number.isFinite(p[1])).map((p, i) => (
          <circle key={i} cx={x(p[0])} cy={y(p[1])} r="3.5" fill="none" stroke="#1d2125" strokeWidth="1.5" />
        ))}
        <text x={(M.left + W - M.right) / 2} y={height - 6} textAnchor="middle" fontSize="12" fontWeight="bold">{xLabel}</text>
        <text transform={`translate(14 ${(M.top + height - M.bottom) / 2}) rotate(-90)`} textAnchor="middle" fontSize="12" fontWeight="bold">{yLabel}</text>
      </svg>
      <figcaption className="text-sm text-ink-soft">
        {title}: open circles are measured points{path ? "; the solid line is the fitted model" : ""}{zeroLine ? "; the dashed line is zero" : ""}.
      </figcaption>
    </figure>
  );
}
