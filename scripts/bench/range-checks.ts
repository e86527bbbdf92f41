// What the range checks at upload add to the upload answer (issue 16): a file the marking job
// would refuse is refused when it arrives, so every upload now runs the checks once
// (app/lib/marking/mark-run.ts rangeCheck: the reading-kind checks and the engine's request checks).
// Pure, no server: 200 groups' 5,000-row CSVs as in the upload burst (closed forms + seeded noise at
// each bench), each parsed as the upload parses it, then range-checked; the check's own time is
// printed beside the parse's, p50 / p95 / max in ms. Target: the checks add < 20 ms.
// Run: npx tsx scripts/bench/range-checks.ts   (BENCH_RANGE_GROUPS, BENCH_RANGE_ROWS to change)
import { performance } from "node:perf_hooks";
import { readCsv } from "../../app/lib/readings/csv";
import { extractPoints } from "../../app/lib/readings/extract";
import { rangeCheck, type MarkingContext } from "../../app/lib/marking/mark-run";
import { runCsv, simulateRun } from "../../app/lib/marking/simulate";
import { rateConstantAt } from "../../app/lib/kinetics/index";
import { rubricFrom } from "../../app/lib/marking/rubric";
import { columnText } from "../../app/lib/readings/table";
import { REFERENCE } from "./lib/upload-groups";

const GROUPS = Number(process.env.BENCH_RANGE_GROUPS ?? 200);
const ROWS = Number(process.env.BENCH_RANGE_ROWS ?? 5000);
const pct = (xs: number[], p: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.ceil((p / 100) * xs.length) - 1)];
const ms = (x: number) => x.toFixed(2);

const parse: number[] = [];
const check: number[] = [];
let refused = 0;
for (let i = 0; i < GROUPS; i++) {
  const temperatureC = 20 + 5 * (i % 5);
  const CB0 = Number((0.025 + 0.0005 * Math.floor(i / 5)).toFixed(4));
  const k = rateConstantAt(REFERENCE.kRef, REFERENCE.TrefC + 273.15, REFERENCE.EaKJ * 1000, temperatureC + 273.15);
  const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: 0.02, CB0 }, k, n: ROWS, seed: 1000 + i });
  const bytes = new TextEncoder().encode(runCsv(run));
  const ctx: MarkingContext = {
    reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: 0.02, CB0 }, temperatureC, measurement: { kind: "concentrationA" },
    reference: { k: REFERENCE.kRef, TrefC: REFERENCE.TrefC, EaKJ: REFERENCE.EaKJ }, rubric: rubricFrom({}),
  };
  const t0 = performance.now();
  const ex = extractPoints(readCsv(bytes, "run.csv"), {}, "run.csv");
  const t1 = performance.now();
  const checked = rangeCheck(ctx, {
    points: ex.points, rowNumbers: ex.rowNumbers, timeUnit: run.timeUnit, concentrationUnit: run.concentrationUnit, measured: "concentrationA",
    reportedK: null, reportedMethod: null, late: false, excludedRows: [], columns: { time: columnText(ex.time), value: columnText(ex.value) },
  });
  const t2 = performance.now();
  if (!checked.ok) refused++;
  parse.push(t1 - t0);
  check.push(t2 - t1);
}
console.log(`range checks at upload: ${GROUPS} files of ${ROWS} rows (closed forms + seeded noise), ${refused} refused (0 expected: honest files)`);
console.log(`  parse (as the upload reads the file): p50 ${ms(pct(parse, 50))} / p95 ${ms(pct(parse, 95))} / max ${ms(Math.max(...parse))} ms`);
console.log(`  range checks added:                   p50 ${ms(pct(check, 50))} / p95 ${ms(pct(check, 95))} / max ${ms(Math.max(...check))} ms (target < 20 ms)`);
if (refused > 0 || pct(check, 95) >= 20) process.exitCode = 1;
