// Nonlinear least squares of the integrated rate law to the measured values themselves
// (no linearising transform, so no distortion of the noise), with k's standard error from
// the Jacobian. Optionally fits the final signal Sinf as a second parameter.
//
// The search is ml-levenberg-marquardt with an analytic Jacobian. Its dense-matrix steps cost
// about 1 us per point, so it runs on at most SEARCH_POINTS points spread over the record. The
// full-data optimum is then reached in one dimension: Sinf enters the model linearly, so for any
// k its best value follows in closed form (variable projection), and k is refined with
// Gauss-Newton steps accelerated by the secant of the gradient, which converges fast even when
// the residuals are large (a rate law that does not fit, in the order comparison).

import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { concentrationA, concentrationASensitivity, maxReactedA, sensitivityGivenCA, type Feed, type RateLaw } from "./rateLaws.ts";
import type { AffineMap } from "./measurement.ts";
import { confidenceInterval } from "./statistics.ts";

export interface NonlinearProblem {
  law: RateLaw;
  feed: Feed;
  /** times, s */
  t: ArrayLike<number>;
  /** measured values, concentrations in mol/L */
  values: ArrayLike<number>;
  /** known map CA -> measured value; omit it and give `S0` to fit Sinf */
  map?: AffineMap;
  /** start signal, when Sinf is to be fitted */
  S0?: number;
  /**
   * weight of each reading, 1/v^2 with v its noise scale (noise.ts); omitted: all 1.
   * The SSE is then the weighted one and residualStdDev the noise scale s (sd = s v).
   */
  weights?: ArrayLike<number>;
}

export interface NonlinearFit {
  k: number;
  kStdErr: number;
  kCI95: [number, number];
  /** fitted final signal, when it was a parameter */
  Sinf?: { value: number; stdErr: number; ci95: [number, number] };
  sse: number;
  /** sqrt(SSE / dof), in the measured quantity's units */
  residualStdDev: number;
  dof: number;
  residuals: number[];
  /** Levenberg-Marquardt iterations plus full-data Gauss-Newton steps */
  iterations: number;
  converged: boolean;
}

const SEARCH_POINTS = 64;
const SEARCH_ITERATIONS = 3;
const MAX_POLISH_STEPS = 60;
const RELATIVE_STEP_TOLERANCE = 1e-10;
const STDERR_STEP_TOLERANCE = 1e-4;
const ROUNDING_FLOOR = 1e-2;

/** Fit k (and Sinf when `problem.map` is absent). A positive `kGuess` seeds the search, else a grid is used. */
export function fitNonlinear(problem: NonlinearProblem, kGuess?: number, stdErrTolerance = STDERR_STEP_TOLERANCE): NonlinearFit {
  if (problem.map === undefined && problem.S0 === undefined) throw new Error("fitting Sinf needs S0");
  const goodGuess = kGuess !== undefined && kGuess > 0 && Number.isFinite(kGuess);
  const start = goodGuess ? { k: kGuess, span: problem.map ? 0 : profiledSpan(problem, kGuess) } : gridStart(problem);

  if (goodGuess) {
    // A seed from the straight line is usually close: refine it on all points directly, and
    // call the library's search only when that does not settle.
    const direct = polish(problem, kGuess, stdErrTolerance);
    if (direct.converged) return finish(problem, direct.at, direct.steps, true);
  }
  const sample = strided(problem, Math.max(1, Math.ceil(problem.t.length / SEARCH_POINTS)));
  let lm = searchWithLibrary(sample, start, SEARCH_ITERATIONS);
  let polished = polish(problem, lm.k, stdErrTolerance);
  let iterations = lm.iterations + polished.steps;
  if (!polished.converged && Number.isFinite(polished.at.k)) {
    // a poor start: let the library search longer on the sample, then refine again
    lm = searchWithLibrary(sample, { k: polished.at.k, span: polished.at.span }, 10 * SEARCH_ITERATIONS);
    polished = polish(problem, lm.k, stdErrTolerance);
    iterations += lm.iterations + polished.steps;
  }
  return finish(problem, polished.at, iterations, polished.converged);
}

/** Levenberg-Marquardt (library) in scaled parameters, so its fixed damping suits every data set. */
function searchWithLibrary(
  problem: NonlinearProblem,
  start: { k: number; span: number },
  maxIterations: number,
): { k: number; span: number; iterations: number } {
  const { law, feed, t, values, map, weights } = problem;
  const reach = maxReactedA(feed);
  const S0 = problem.S0 ?? 0;
  const kScale = start.k;
  const spanScale = map ? 1 : Math.abs(start.span) || 1;
  const valueScale = map ? Math.abs(map.slope) * reach || 1 : spanScale;
  const y = new Float64Array(t.length);
  for (let i = 0; i < t.length; i++) y[i] = values[i] / valueScale;

  const model = (p: number[]) => {
    const k = p[0] * kScale;
    if (map) return (ti: number) => (map.offset + map.slope * concentrationA(law, feed, k, ti)) / valueScale;
    const span = p[1] * spanScale;
    return (ti: number) => (S0 + (span * (feed.CA0 - concentrationA(law, feed, k, ti))) / reach) / valueScale;
  };
  const jacobian = (p: number[]) => {
    const k = p[0] * kScale;
    if (map) {
      const factor = (map.slope * kScale) / valueScale;
      return (ti: number) => [factor * concentrationASensitivity(law, feed, k, ti)];
    }
    const span = p[1] * spanScale;
    return (ti: number) => [
      ((-span * kScale) / (reach * valueScale)) * concentrationASensitivity(law, feed, k, ti),
      ((feed.CA0 - concentrationA(law, feed, k, ti)) / reach) * (spanScale / valueScale),
    ];
  };
  let r: ReturnType<typeof levenbergMarquardt>;
  try {
    r = levenbergMarquardt({ x: t, y }, model, {
    initialValues: map ? [1] : [1, start.span / spanScale],
    jacobianFunction: jacobian,
    maxIterations,
    errorTolerance: 0,
    damping: 1e-3,
    ...(weights ? { weights: Array.from(weights, (w) => 1 / Math.sqrt(w)) } : {}),
    minValues: map ? [0] : [0, -Number.MAX_VALUE],
    maxValues: map ? [Number.MAX_VALUE] : [Number.MAX_VALUE, Number.MAX_VALUE],
    });
  } catch {
    // degenerate data (e.g. no change at all) can make the library's linear algebra fail:
    // keep the start and let the caller report that the fit did not converge
    return { k: start.k, span: start.span, iterations: 0 };
  }
  const p = r.parameterValues;
  return { k: p[0] * kScale, span: map ? 0 : p[1] * spanScale, iterations: r.iterations };
}

interface Profile {
  k: number;
  /** residual sum of squares at k, with the span Sinf - S0 at its best value for that k */
  sse: number;
  span: number;
  /** J'r for k (half the downhill gradient of the SSE) */
  g: number;
  /** Gauss-Newton curvature for k, J'J with the span projected out */
  h: number;
  /** J'J entries for (k, span), for the covariance */
  jkk: number;
  jks: number;
  jss: number;
  /** residuals (known map), or the extent f per point (fitted Sinf: residual = y - span f) */
  perPoint: Float64Array;
}

/** One pass over the data at k: everything needed for a step and, at the optimum, for the result. */
function profile(problem: NonlinearProblem, k: number, perPoint: Float64Array = new Float64Array(problem.t.length)): Profile {
  const { law, feed, t, values, map, weights } = problem;
  if (map) {
    let sse = 0;
    let g = 0;
    let h = 0;
    for (let i = 0; i < t.length; i++) {
      const c = concentrationA(law, feed, k, t[i]);
      const r = values[i] - map.offset - map.slope * c;
      const dk = map.slope * sensitivityGivenCA(law, feed, k, t[i], c);
      perPoint[i] = r;
      const w = weights ? weights[i] : 1;
      sse += w * r * r;
      g += w * dk * r;
      h += w * dk * dk;
    }
    return { k, sse, span: 0, g, h, jkk: h, jks: 0, jss: 0, perPoint };
  }
  // Signal S = S0 + span f, f = (CA0 - CA)/reach: sums from which the best span, the SSE and
  // the k-derivatives at that span all follow.
  const reach = maxReactedA(feed);
  const S0 = problem.S0 ?? 0;
  let sff = 0;
  let sfy = 0;
  let syy = 0;
  let sdy = 0;
  let sdf = 0;
  let sdd = 0;
  for (let i = 0; i < t.length; i++) {
    const c = concentrationA(law, feed, k, t[i]);
    const f = (feed.CA0 - c) / reach;
    const d = sensitivityGivenCA(law, feed, k, t[i], c);
    const y = values[i] - S0;
    perPoint[i] = f;
    const w = weights ? weights[i] : 1;
    sff += w * f * f;
    sfy += w * f * y;
    syy += w * y * y;
    sdy += w * d * y;
    sdf += w * d * f;
    sdd += w * d * d;
  }
  const span = sff > 0 ? sfy / sff : 0;
  const c = -span / reach; // dS/dk = c * dCA/dk
  const jkk = c * c * sdd;
  const jks = c * sdf;
  return {
    k,
    sse: Math.max(0, syy - span * sfy),
    span,
    g: c * (sdy - span * sdf),
    h: jkk - (sff > 0 ? (jks * jks) / sff : 0),
    jkk,
    jks,
    jss: sff,
    perPoint,
  };
}

/** Refines k on the full data; returns the profile at the last accepted k and whether the step left is negligible. */
function polish(problem: NonlinearProblem, k: number, stdErrTolerance: number): { at: Profile; steps: number; converged: boolean } {
  const dof = problem.t.length - (problem.map ? 1 : 2);
  let current = profile(problem, k);
  let spare: Float64Array = new Float64Array(problem.t.length);
  let previous: { k: number; g: number } | null = null;
  for (let step = 0; step < MAX_POLISH_STEPS; step++) {
    const gaussNewton = current.g / current.h;
    if (!Number.isFinite(gaussNewton)) return { at: current, steps: step, converged: false };
    let delta = gaussNewton;
    if (previous) {
      // the secant of g estimates the full curvature, residual terms included
      const slope = (current.g - previous.g) / (current.k - previous.k);
      const secant = -current.g / slope;
      if (slope < 0 && Math.abs(secant) <= 4 * Math.abs(gaussNewton)) delta = secant;
    }
    // Done when the step left is negligible against k itself or against its standard error.
    const stdErr = Math.sqrt(current.sse / dof / current.h);
    if (Math.abs(delta) <= Math.max(RELATIVE_STEP_TOLERANCE * current.k, stdErrTolerance * stdErr)) {
      return { at: current, steps: step, converged: true };
    }
    let accepted = false;
    // Halve the step until the SSE falls, but not below what the convergence test ignores anyway:
    // each try is a pass over the whole record.
    const smallest = stdErrTolerance * stdErr;
    for (let halving = 0, scale = 1; halving < 20 && !accepted && (halving === 0 || scale * Math.abs(delta) > smallest); halving++, scale /= 2) {
      const kNew = current.k + scale * delta;
      if (!(kNew > 0)) continue;
      const next = profile(problem, kNew, spare);
      if (next.sse < current.sse) {
        previous = { k: current.k, g: current.g };
        spare = current.perPoint;
        current = next;
        accepted = true;
      }
    }
    // No step lowers the SSE any more: on a long record the gradient is then rounding noise.
    // That is the optimum if what is left is far below the statistical uncertainty.
    if (!accepted) return { at: current, steps: step, converged: Math.abs(delta) <= ROUNDING_FLOOR * stdErr };
  }
  return { at: current, steps: MAX_POLISH_STEPS, converged: false };
}

/** Residuals and standard errors from the covariance s^2 (J'J)^-1 at the optimum. */
function finish(problem: NonlinearProblem, at: Profile, iterations: number, converged: boolean): NonlinearFit {
  const { t, values, map, weights } = problem;
  const n = t.length;
  const residuals = new Array<number>(n);
  let sse = at.sse;
  if (map) {
    for (let i = 0; i < n; i++) residuals[i] = at.perPoint[i];
  } else {
    // recomputed from the residuals themselves: the SSE from sums loses digits on exact data
    const S0 = problem.S0 ?? 0;
    sse = 0;
    for (let i = 0; i < n; i++) {
      const r = values[i] - S0 - at.span * at.perPoint[i];
      residuals[i] = r;
      sse += (weights ? weights[i] : 1) * r * r;
    }
  }
  const { k, jkk, jks, jss } = at;
  const dof = n - (map ? 1 : 2);
  const variance = dof > 0 ? sse / dof : NaN;
  const det = jkk * jss - jks * jks;
  const kStdErr = Math.sqrt(map ? variance / jkk : (variance * jss) / det);
  const fit: NonlinearFit = {
    k,
    kStdErr,
    kCI95: confidenceInterval(k, kStdErr, dof),
    sse,
    residualStdDev: Math.sqrt(variance),
    dof,
    residuals,
    iterations,
    converged,
  };
  if (!map) {
    const value = (problem.S0 ?? 0) + at.span;
    const stdErr = Math.sqrt((variance * jkk) / det);
    fit.Sinf = { value, stdErr, ci95: confidenceInterval(value, stdErr, dof) };
  }
  return fit;
}

/** Least-squares signal span Sinf - S0 for a fixed k (the model is linear in it). */
function profiledSpan(problem: NonlinearProblem, k: number): number {
  const { law, feed, t, values, weights } = problem;
  const reach = maxReactedA(feed);
  const S0 = problem.S0 ?? 0;
  let sff = 0;
  let sfy = 0;
  for (let i = 0; i < t.length; i++) {
    const f = (feed.CA0 - concentrationA(law, feed, k, t[i])) / reach;
    const w = weights ? weights[i] : 1;
    sff += w * f * f;
    sfy += w * f * (values[i] - S0);
  }
  return sff > 0 ? sfy / sff : 0;
}

/** Coarse search over k on a log grid around the natural time scale of the run. */
function gridStart(problem: NonlinearProblem): { k: number; span: number } {
  const { law, feed, map } = problem;
  const sample = strided(problem, Math.max(1, Math.ceil(problem.t.length / SEARCH_POINTS)));
  const { t, values, weights } = sample;
  let tMax = 0;
  for (let i = 0; i < t.length; i++) tMax = Math.max(tMax, t[i]);
  if (!(tMax > 0)) tMax = 1;
  const concentrationScale =
    law === "first-order" ? 1 : law === "second-order-A" ? feed.CA0 : Math.max(feed.CB0, feed.nu * feed.CA0);
  const k0 = 1 / (tMax * concentrationScale);
  const reach = maxReactedA(feed);
  const S0 = problem.S0 ?? 0;
  let best = { k: k0, span: 0, sse: Infinity };
  for (let j = -24; j <= 24; j++) {
    const k = k0 * 10 ** (j / 6);
    const span = map ? 0 : profiledSpan(sample, k);
    let sse = 0;
    for (let i = 0; i < t.length; i++) {
      const c = concentrationA(law, feed, k, t[i]);
      const predicted = map ? map.offset + map.slope * c : S0 + (span * (feed.CA0 - c)) / reach;
      const r = values[i] - predicted;
      sse += (weights ? weights[i] : 1) * r * r;
    }
    if (sse < best.sse) best = { k, span, sse };
  }
  return { k: best.k, span: best.span };
}

/** Every stride-th point (and the last), for the search on long records. */
function strided(problem: NonlinearProblem, stride: number): NonlinearProblem {
  if (stride === 1) return problem;
  const t: number[] = [];
  const values: number[] = [];
  const w = problem.weights;
  const weights: number[] | undefined = w ? [] : undefined;
  const n = problem.t.length;
  for (let i = 0; i < n; i += stride) {
    t.push(problem.t[i]);
    values.push(problem.values[i]);
    if (w) weights!.push(w[i]);
  }
  if ((n - 1) % stride !== 0) {
    t.push(problem.t[n - 1]);
    values.push(problem.values[n - 1]);
    if (w) weights!.push(w[n - 1]);
  }
  return { ...problem, t, values, weights };
}
