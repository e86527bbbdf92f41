// A signal whose first reading is not at mixing (the clock started at mixing, the first reading
// 45 s later): its start value S0 is a parameter of the curve fit, never the first reading.
//
//   S(t) = S0 + (Sinf - S0) x(t; k),   x = (CA0 - CA(t; k)) / (CA0 - CA_final), the extent
//
// For a given S0 the curve fit (nonlinearFit.ts) gives the best k, and Sinf when it is not known;
// S0 is the value with the smallest residual sum of squares (profile over S0, golden-section
// search). k's interval then comes from the joint covariance of (k, S0[, Sinf]) at the optimum,
// s^2 (J^T J)^-1 with the Jacobian of the model (Gauss-Newton linearisation of nonlinear least
// squares, e.g. Bates and Watts, Nonlinear Regression Analysis, ch. 2; from memory), Student t with
// n - p degrees of freedom. Readings weigh alike (absolute noise, as a conductivity cell errs).
import { concentrationA, concentrationASensitivity, maxReactedA } from "./rateLaws.ts";
import { lawFromOrders } from "./rateLaws.ts";
import { signalMap } from "./measurement.ts";
import { fitNonlinear, type NonlinearFit } from "./nonlinearFit.ts";
import { toSI } from "./lawFit.ts";
import { confidenceInterval } from "./statistics.ts";
import type { FitRequest } from "./request.ts";

export interface SignalStart {
  /** fitted start value, signal units */
  S0: number;
  stdErr: number;
  ci95: [number, number];
  /** k (per second) with its standard error and interval from the joint covariance */
  k: number;
  kStdErr: number;
  kCI95: [number, number];
  dof: number;
}

const GOLDEN = (Math.sqrt(5) - 1) / 2;
const SEARCH_STEPS = 60;

/** S0 of a signal run from the curve fit; null when the readings cannot place it (no change, too few). */
export function fitSignalStart(request: FitRequest): SignalStart | null {
  const m = request.measurement;
  if (m.kind !== "signal") return null;
  const law = lawFromOrders(request.reaction.orderA, request.reaction.orderB);
  if (!law) return null;
  const data = toSI(request);
  const { feed, t, values } = data;
  const n = t.length;
  const sinfKnown = m.Sinf !== undefined && Number.isFinite(m.Sinf);
  const p = sinfKnown ? 2 : 3;
  if (n < p + 2) return null;
  let first = 0;
  let last = 0;
  for (let i = 1; i < n; i++) {
    if (t[i] < t[first]) first = i;
    if (t[i] > t[last]) last = i;
  }
  const far = sinfKnown ? m.Sinf! : values[last];
  const change = values[first] - far;
  if (!(Math.abs(change) > 0)) return null;

  let kGuess: number | undefined;
  const fitAt = (S0: number): NonlinearFit =>
    sinfKnown ? fitNonlinear({ law, feed, t, values, map: signalMap(S0, m.Sinf!, feed) }, kGuess) : fitNonlinear({ law, feed, t, values, S0 }, kGuess);
  const sseAt = (S0: number) => {
    const f = fitAt(S0);
    if (f.converged && Number.isFinite(f.k) && f.k > 0) kGuess = f.k;
    return Number.isFinite(f.sse) ? f.sse : Infinity;
  };
  // S0 lies beyond the first reading, away from where the signal is heading
  let a = values[first] - 0.1 * change;
  let b = values[first] + 3 * change;
  let c = b - GOLDEN * (b - a);
  let d = a + GOLDEN * (b - a);
  let fc = sseAt(c);
  let fd = sseAt(d);
  for (let i = 0; i < SEARCH_STEPS; i++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - GOLDEN * (b - a);
      fc = sseAt(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + GOLDEN * (b - a);
      fd = sseAt(d);
    }
  }
  const S0 = (a + b) / 2;
  const fit = fitAt(S0);
  if (!Number.isFinite(fit.k) || fit.k <= 0) return null;
  const Sinf = sinfKnown ? m.Sinf! : fit.Sinf!.value;

  // joint covariance of (k, S0[, Sinf]) from the model's Jacobian at the optimum
  const reach = maxReactedA(feed);
  const JtJ = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const CA = concentrationA(law, feed, fit.k, t[i]);
    const x = (feed.CA0 - CA) / reach;
    const row = [(-(Sinf - S0) / reach) * concentrationASensitivity(law, feed, fit.k, t[i]), 1 - x];
    if (!sinfKnown) row.push(x);
    const r = values[i] - (S0 + (Sinf - S0) * x);
    sse += r * r;
    for (let u = 0; u < p; u++) for (let v = 0; v < p; v++) JtJ[u][v] += row[u] * row[v];
  }
  const inv = invert(JtJ);
  if (!inv) return null;
  const dof = n - p;
  const s2 = sse / dof;
  const kStdErr = Math.sqrt(s2 * inv[0][0]);
  const stdErr = Math.sqrt(s2 * inv[1][1]);
  return { S0, stdErr, ci95: confidenceInterval(S0, stdErr, dof), k: fit.k, kStdErr, kCI95: confidenceInterval(fit.k, kStdErr, dof), dof };
}

/** Inverse of a small symmetric matrix (Gauss-Jordan with partial pivoting); null when singular. */
function invert(a: number[][]): number[][] | null {
  const n = a.length;
  const m = a.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(m[r][col]) > Math.abs(m[pivot][col])) pivot = r;
    if (!(Math.abs(m[pivot][col]) > 0)) return null;
    [m[col], m[pivot]] = [m[pivot], m[col]];
    const f = m[col][col];
    for (let j = 0; j < 2 * n; j++) m[col][j] /= f;
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const g = m[r][col];
      if (g !== 0) for (let j = 0; j < 2 * n; j++) m[r][j] -= g * m[col][j];
    }
  }
  return m.map((row) => row.slice(n));
}
