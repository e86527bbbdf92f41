// A practical's class results: which benches' marking k enter the pooled Arrhenius fit (ln k
// against 1/T, the engine's weighted fit in ../kinetics/arrhenius.ts), the fit beside the reaction
// system's reference, and each bench's deviation from the reference k at its temperature.
// Reference pre-exponential factor: k = A exp(-Ea/(R T)) at Tref gives A = kRef exp(Ea/(R Tref))
// (the Arrhenius equation; any physical chemistry textbook, from memory). Pure: no database.
import { GAS_CONSTANT, rateConstantAt, runArrhenius } from "../kinetics/arrhenius.ts";
import { deviationPct } from "../marking/marks.ts";

/** The longest reason for leaving a bench out of the fit, in characters. */
export const REASON_MAX = 500;

/** The fit needs at least this many benches (a line with an interval needs n - 2 >= 1). */
export const MIN_BENCHES_FOR_FIT = 3;

export interface ClassBenchInput {
  benchId: number;
  bench: string;
  group: string;
  temperatureC: number;
  /** the group's latest version, when there is one */
  submissionId: number | null;
  /** status of the group's latest version; null when the group has not uploaded */
  status: string | null;
  /** marking k of that version, per second (mol/L) */
  k: number | null;
  kStdErr: number | null;
  kCI95: [number, number] | null;
}

export interface ReferenceInput {
  /** per second (mol/L), at TrefC */
  kRef: number;
  TrefC: number;
  EaKJ: number;
}

export interface ExclusionInput {
  benchId: number;
  reason: string;
  by: string | null;
  /** ISO time */
  at: string;
}

/** in-fit: used; excluded: left out by a person; the rest have no marking k to use yet. */
export type BenchState = "in-fit" | "excluded" | "no-upload" | "not-marked" | "no-k";

export interface ClassBench extends ClassBenchInput {
  state: BenchState;
  /** why the bench is not in the fit, for people */
  note: string | null;
  exclusion: ExclusionInput | null;
  kRefAtT: number;
  /** signed, marking k against kRefAtT, in percent; null without a k */
  deviationPct: number | null;
  /** 1/T in 1/K, and ln(k / unit); null without a k */
  inverseT: number;
  lnK: number | null;
  /** the fitted line's k at this temperature, and the ln k residual, for benches in the fit */
  kFitted: number | null;
  lnResidual: number | null;
}

export interface ClassFit {
  EaKJ: number;
  EaKJCI95: [number, number];
  /** per second (mol/L), like k */
  A: number;
  ACI95: [number, number];
  lnA: number;
  r2: number;
  n: number;
  dof: number;
  weighting: "k-uncertainty" | "equal";
  reducedChiSquare: number;
}

export interface ClassResults {
  benches: ClassBench[];
  reference: ReferenceInput & { A: number; lnA: number };
  fit: ClassFit | null;
  /** why there is no fit, in plain words; null when there is one */
  noFit: string | null;
  counts: { inFit: number; excluded: number; waiting: number };
  /** ln k against 1000/T (so the axis reads in 10⁻³ K⁻¹) */
  plot: { inFit: Array<[number, number]>; excluded: Array<[number, number]>; fitted: Array<[number, number]>; reference: Array<[number, number]> };
}

const kelvin = (c: number) => c + 273.15;

function stateOf(b: ClassBenchInput, excluded: boolean): { state: BenchState; note: string | null } {
  if (b.status === null) return { state: "no-upload", note: "no upload yet" };
  if (b.status !== "marked") {
    const why = b.status === "queued" ? "latest version is being marked" : b.status === "refused" ? "latest file was refused" : `latest version is ${b.status}`;
    return { state: "not-marked", note: why };
  }
  if (!(b.k !== null && Number.isFinite(b.k) && b.k > 0)) return { state: "no-k", note: "no positive marking k" };
  if (excluded) return { state: "excluded", note: "left out of the fit" };
  return { state: "in-fit", note: null };
}

/** The class's pooled Arrhenius fit over the benches in it, and every bench's place in it. */
export function classResults(rows: readonly ClassBenchInput[], reference: ReferenceInput, exclusions: readonly ExclusionInput[]): ClassResults {
  const byBench = new Map(exclusions.map((e) => [e.benchId, e]));
  const TrefK = kelvin(reference.TrefC);
  const EaJ = reference.EaKJ * 1000;
  const lnARef = Math.log(reference.kRef) + EaJ / (GAS_CONSTANT * TrefK);
  const benches: ClassBench[] = rows.map((b) => {
    const exclusion = byBench.get(b.benchId) ?? null;
    const { state, note } = stateOf(b, exclusion !== null);
    const kRefAtT = rateConstantAt(reference.kRef, TrefK, EaJ, kelvin(b.temperatureC));
    const hasK = state === "in-fit" || state === "excluded";
    return {
      ...b, state, note, exclusion, kRefAtT,
      deviationPct: hasK ? deviationPct(b.k!, kRefAtT) : null,
      inverseT: 1 / kelvin(b.temperatureC),
      lnK: hasK ? Math.log(b.k!) : null,
      kFitted: null,
      lnResidual: null,
    };
  });
  const used = benches.filter((b) => b.state === "in-fit");
  const excluded = benches.filter((b) => b.state === "excluded");
  const counts = { inFit: used.length, excluded: excluded.length, waiting: benches.length - used.length - excluded.length };
  const temperatures = new Set(used.map((b) => b.temperatureC));
  let noFit: string | null = null;
  if (used.length < MIN_BENCHES_FOR_FIT) {
    const left = excluded.length ? ` (${excluded.length} left out of the fit)` : "";
    noFit = `No pooled fit yet: ${used.length === 0 ? "no bench has" : used.length === 1 ? "only 1 bench has" : `only ${used.length} benches have`} a marked k to use${left}, and the fit needs at least ${MIN_BENCHES_FOR_FIT}.`;
  } else if (temperatures.size < 2) {
    noFit = "No pooled fit: every bench in the fit is at the same temperature, so the slope (and Ea) cannot be found. Benches at two temperatures at least are needed.";
  }
  let fit: ClassFit | null = null;
  if (noFit === null) {
    // Weights come from each bench's k standard error when every bench has one (the engine's rule).
    const r = runArrhenius(used.map((b) => ({ id: String(b.benchId), temperatureC: b.temperatureC, k: b.k!, kStdErr: b.kStdErr !== null && b.kStdErr > 0 ? b.kStdErr : undefined })));
    fit = { EaKJ: r.EaKJ, EaKJCI95: r.EaKJCI95, A: r.A, ACI95: r.ACI95, lnA: r.lnA, r2: r.r2, n: r.n, dof: r.dof, weighting: r.weighting, reducedChiSquare: r.reducedChiSquare };
    for (const fitted of r.benches) {
      const b = used.find((u) => String(u.benchId) === fitted.id)!;
      b.kFitted = fitted.kFitted;
      b.lnResidual = fitted.lnResidual;
    }
  }
  // The plot: points at 1000/T; both lines across the temperatures of every bench shown.
  const xs = benches.filter((b) => b.lnK !== null).map((b) => 1000 * b.inverseT);
  const xAll = xs.length ? xs : benches.map((b) => 1000 * b.inverseT);
  const line = (lnA: number, EaJPerMol: number): Array<[number, number]> => {
    if (!xAll.length) return [];
    const lo = Math.min(...xAll);
    const hi = Math.max(...xAll);
    const ends = lo === hi ? [lo] : [lo, hi];
    return ends.map((x) => [x, lnA - (EaJPerMol / GAS_CONSTANT) * (x / 1000)]);
  };
  return {
    benches,
    reference: { ...reference, A: Math.exp(lnARef), lnA: lnARef },
    fit,
    noFit,
    counts,
    plot: {
      inFit: used.map((b) => [1000 * b.inverseT, b.lnK!]),
      excluded: excluded.map((b) => [1000 * b.inverseT, b.lnK!]),
      fitted: fit ? line(fit.lnA, fit.EaKJ * 1000) : [],
      reference: line(lnARef, EaJ),
    },
  };
}
