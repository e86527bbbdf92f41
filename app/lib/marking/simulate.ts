// Invented runs for the demo, the tests and the benchmark: readings made from a known k with the
// engine's closed forms plus seeded noise, optionally with one of the usual mistakes, and the k
// the group would report from its own (right or wrong) straight line. Never used to mark real data.
import { concentrationA, lawFromOrders, lineY, maxReactedA, timeToReach, type Feed, type RateLaw } from "../kinetics/index.ts";
import { fitLine } from "../kinetics/linearFit.ts";
import { normalSource } from "../kinetics/synthetic.ts";

export const MISTAKES = ["none", "minutes-as-seconds", "mmol-as-mol", "wrong-line", "low-conversion", "wild-reading"] as const;
export type Mistake = (typeof MISTAKES)[number];

export interface SimulationInput {
  reaction: { a: number; b: number; orderA: number; orderB: number };
  /** mol/L */
  feed: { CA0: number; CB0: number };
  /** the true k at the bench's temperature, per second */
  k: number;
  /** readings to take */
  n: number;
  /** conversion of the limiting reagent at the last reading (0-1) */
  conversion?: number;
  /** relative noise of each reading (standard deviation / value) */
  noise?: number;
  seed: number;
  mistake?: Mistake;
  /** write a signal linear in the extent instead of CA (conductivity, mS/cm): S0 at the start, Sinf at the end */
  signal?: { S0: number; Sinf: number; noise: number };
}

export interface SimulatedRun {
  header: [string, string];
  /** [time as written, CA as written] */
  rows: Array<[number, number]>;
  /** the k the group would report (per second), from its own straight line */
  reportedK: number;
  reportedMethod: string;
  /** what the file's header says, which for a mistake is not what the numbers are */
  timeUnit: "s" | "min";
  concentrationUnit: "mol/L" | "mmol/L";
}

function textbookForm(law: RateLaw, feed: Feed): string {
  if (law === "first-order") return "ln(CA0/CA)";
  if (law === "second-order-A") return "1/CA - 1/CA0";
  return Math.abs(feed.CB0 - feed.nu * feed.CA0) <= 1e-6 * feed.CB0 ? "1/CA - 1/CA0" : "ln[(CB*CA0)/(CB0*CA)]";
}

export function simulateRun(input: SimulationInput): SimulatedRun {
  const law = lawFromOrders(input.reaction.orderA, input.reaction.orderB);
  if (!law) throw new Error("unsupported orders");
  const feed: Feed = { CA0: input.feed.CA0, CB0: input.feed.CB0, nu: input.reaction.a > 0 ? input.reaction.b / input.reaction.a : 1 };
  const mistake = input.mistake ?? "none";
  const conversion = mistake === "low-conversion" ? 0.1 : (input.conversion ?? 0.8);
  const caEnd = feed.CA0 - conversion * maxReactedA(feed);
  const tEnd = timeToReach(law, feed, input.k, caEnd);
  const normal = normalSource(input.seed);
  const noise = input.noise ?? 0.008;
  const tS: number[] = [];
  const ca: number[] = [];
  for (let i = 0; i < input.n; i++) {
    const t = (tEnd * i) / (input.n - 1);
    tS.push(t);
    ca.push(concentrationA(law, feed, input.k, t) * (1 + noise * normal()));
  }
  if (mistake === "wild-reading") {
    const i = Math.floor(input.n * 0.55);
    ca[i] *= 1.35; // a misread scale or a typing slip
  }
  // The file as the group writes it: minutes and mmol/L, unless the mistake is in the units.
  const minutes = tS.map((t) => t / 60);
  const mmol = ca.map((c) => c * 1000);
  const rows: Array<[number, number]> = minutes.map((t, i) => [round(t, 4), round(mmol[i], 5)]);
  let header: [string, string] = ["t / min", "CA (mmol/L)"];
  let timeUnit: SimulatedRun["timeUnit"] = "min";
  let concentrationUnit: SimulatedRun["concentrationUnit"] = "mmol/L";
  if (mistake === "minutes-as-seconds") {
    header = ["t / s", "CA (mmol/L)"];
    timeUnit = "s";
  }
  if (mistake === "mmol-as-mol") {
    header = ["t / min", "CA (mol/L)"];
    concentrationUnit = "mol/L";
  }
  // The group's own k: the least-squares slope of its straight line, in the units it believed.
  const secondsPerUnit = timeUnit === "min" ? 60 : 1;
  const molPerUnit = concentrationUnit === "mmol/L" ? 1e-3 : 1;
  const believedT = rows.map((r) => r[0] * secondsPerUnit);
  const believedCA = rows.map((r) => r[1] * molPerUnit);
  const believedFeed: Feed = mistake === "mmol-as-mol" ? { CA0: feed.CA0 * 1000, CB0: feed.CB0 * 1000, nu: feed.nu } : feed;
  let reportedMethod = textbookForm(law, feed);
  let lineLaw: RateLaw = law;
  if (mistake === "wrong-line") {
    // the straight line of another rate law, drawn for a feed that needs this one
    lineLaw = law === "second-order-A" ? "first-order" : "second-order-A";
    reportedMethod = lineLaw === "first-order" ? "ln(CA0/CA)" : "1/CA - 1/CA0";
  }
  const ys = believedCA.map((c) => lineY(lineLaw, believedFeed, c));
  const ok = ys.map((y, i) => [believedT[i], y] as const).filter(([, y]) => Number.isFinite(y));
  const line = fitLine(ok.map((p) => p[0]), ok.map((p) => p[1]));
  if (input.signal && mistake === "none") {
    // the same run read by a conductivity cell: linear in the extent of reaction
    const { S0, Sinf, noise: sd } = input.signal;
    const reach = maxReactedA(feed);
    const kappa = tS.map((t) => S0 + ((Sinf - S0) * (feed.CA0 - concentrationA(law, feed, input.k, t))) / reach + sd * normal());
    return {
      header: ["t / min", "kappa (mS/cm)"],
      rows: minutes.map((t, i) => [round(t, 4), round(kappa[i], 4)]),
      reportedK: Number(line.slope.toPrecision(4)),
      reportedMethod,
      timeUnit,
      concentrationUnit,
    };
  }
  return { header, rows, reportedK: Number(line.slope.toPrecision(4)), reportedMethod, timeUnit, concentrationUnit };
}

function round(x: number, digits: number): number {
  return Number(x.toPrecision(digits + 2));
}

/** The run as CSV text (comma separated, header row, Unix line ends). */
export function runCsv(run: SimulatedRun, decimalComma = false): string {
  const sep = decimalComma ? ";" : ",";
  const num = (x: number) => (decimalComma ? String(x).replace(".", ",") : String(x));
  return [run.header.join(sep), ...run.rows.map((r) => `${num(r[0])}${sep}${num(r[1])}`)].join("\n") + "\n";
}
