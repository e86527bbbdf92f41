// A small predicted CA(t) curve for one bench, with its axes named; the numbers sit beside it.
export function CurveThumb({ curve, label }: { curve: Array<[number, number]>; label: string }) {
  if (curve.length < 2) return null;
  const W = 140;
  const H = 56;
  const P = { l: 4, r: 4, t: 4, b: 14 };
  const tMax = curve[curve.length - 1][0] || 1;
  const cMax = Math.max(...curve.map((p) => p[1])) || 1;
  const x = (t: number) => P.l + (t / tMax) * (W - P.l - P.r);
  const y = (c: number) => P.t + (1 - c / cMax) * (H - P.t - P.b);
  const d = curve.map(([t, c], i) => `${i ? "L" : "M"}${x(t).toFixed(1)},${y(c).toFixed(1)}`).join(" ");
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width={W} height={H} role="img" aria-label={`Predicted concentration of A against time for bench ${label}, 0 to ${tMax.toFixed(0)} min`}>
      <line x1={P.l} y1={H - P.b} x2={W - P.r} y2={H - P.b} stroke="currentColor" strokeWidth="1" />
      <line x1={P.l} y1={P.t} x2={P.l} y2={H - P.b} stroke="currentColor" strokeWidth="1" />
      <path d={d} fill="none" stroke="#0b6170" strokeWidth="2" />
      <text x={W - P.r} y={H - 2} textAnchor="end" fontSize="11" fill="currentColor">{`t / min, 0–${tMax.toFixed(0)}`}</text>
      <text x={P.l + 4} y={P.t + 10} fontSize="11" fill="currentColor">CA</text>
    </svg>
  );
}
