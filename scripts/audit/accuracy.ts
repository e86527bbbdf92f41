// Accuracy audit of the marking k on honest, seeded bench runs against ODE ground truth
// (simulate.ts). Prints one row per scenario: the share of runs whose k falls outside +-20 % of
// the truth and the coverage of the 95 % interval, for the marking k (weighted line), the old
// marking estimator (the unweighted line) and the curve fit; then the flag rates.
// Usage: npx tsx scripts/audit/accuracy.ts [runs per scenario, default 1000] [filter text]

import { auditGrid, exactFlags, prepare, simulate, type Tally } from "./simulate.ts";

const reps = Number(process.argv[2] ?? 1000);
const filter = process.argv[3] ?? "";
const pct = (x: number, n: number) => ((100 * x) / n).toFixed(1).padStart(5);

console.log(`runs per scenario: ${reps}; ground truth: odex at rtol 1e-12; 20 evenly spaced readings from t = 0`);
console.log(
  ["scenario".padEnd(58), "mark>20%", "mark cov", "line>20%", "line cov", "curve>20%", "curve cov", "any flag", "flags (runs)"].join(" | "),
);
const totals: Tally = { runs: 0, markOutside20: 0, markCovered: 0, lineOutside20: 0, lineCovered: 0, curveOutside20: 0, curveCovered: 0, flags: {}, anyFlag: 0 };
let worstOutside = 0;
let coverageLow = 1;
let coverageHigh = 0;
let exactProblems = 0;
const t0 = performance.now();
auditGrid().forEach((s, index) => {
  if (filter && !s.name.includes(filter)) return;
  const p = prepare(s);
  const exact = exactFlags(p);
  if (exact.length) {
    exactProblems++;
    console.log(`  exact data of ${s.name} raised: ${exact.join(", ")}`);
  }
  const t = simulate(p, reps, 1000 + index);
  for (const key of ["runs", "markOutside20", "markCovered", "lineOutside20", "lineCovered", "curveOutside20", "curveCovered", "anyFlag"] as const) totals[key] += t[key];
  for (const [code, c] of Object.entries(t.flags)) totals.flags[code as keyof Tally["flags"]] = (totals.flags[code as keyof Tally["flags"]] ?? 0) + c;
  worstOutside = Math.max(worstOutside, t.markOutside20 / t.runs);
  coverageLow = Math.min(coverageLow, t.markCovered / t.runs);
  coverageHigh = Math.max(coverageHigh, t.markCovered / t.runs);
  const flags = Object.entries(t.flags)
    .map(([c, v]) => `${c} ${v}`)
    .join(", ");
  console.log(
    [
      s.name.padEnd(58),
      pct(t.markOutside20, t.runs).padStart(8),
      pct(t.markCovered, t.runs).padStart(8),
      pct(t.lineOutside20, t.runs).padStart(8),
      pct(t.lineCovered, t.runs).padStart(8),
      pct(t.curveOutside20, t.runs).padStart(9),
      pct(t.curveCovered, t.runs).padStart(9),
      pct(t.anyFlag, t.runs).padStart(8),
      flags,
    ].join(" | "),
  );
});
console.log(
  `all: ${totals.runs} runs in ${((performance.now() - t0) / 1000).toFixed(1)} s; marking k outside +-20 %: ${pct(totals.markOutside20, totals.runs)} % (worst scenario ${(100 * worstOutside).toFixed(1)} %); coverage ${pct(totals.markCovered, totals.runs)} % (scenarios ${(100 * coverageLow).toFixed(1)}-${(100 * coverageHigh).toFixed(1)} %); old estimator outside: ${pct(totals.lineOutside20, totals.runs)} %, coverage ${pct(totals.lineCovered, totals.runs)} %`,
);
console.log(
  `flag rates over all runs: ${Object.entries(totals.flags)
    .map(([c, v]) => `${c} ${pct(v, totals.runs).trim()} %`)
    .join(", ") || "none"}; exact data sets with a flag: ${exactProblems}`,
);
