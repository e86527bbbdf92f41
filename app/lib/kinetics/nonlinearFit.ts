// Nonlinear least squares of the integrated rate law to the measured values themselves
// (no linearising transform, so no distortion of the noise), with k's standard error from
// the Jacobian. Optionally fits the final signal Sinf as a second parameter.
//
// The search is ml-levenberg-marquardt with an analytic Jacobian. Its dense-matrix steps cost
// about 1 us per point, so it runs on at most SEARCH_POINTS points spread over the record; the
// full-data optimum is then reached with Gauss-Newton steps computed in the same pass as the
// standard errors (quadratic convergence from the nearby start). If those steps stall, the
// library is run on the full data instead.

import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { concentrationA, concentrationASensitivity, maxReactedA, type Feed, type RateLaw } from "./rateLaws.ts";
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
const MAX_POLISH_STEPS = 10;
const RELATIVE_STEP_TOLERANCE = 1e-10;
const STDERR_STEP_TOLERANCE = 1e-6;

/** Fit k (and Sinf when `problem.map` is absent). A positive `kGuess` seeds the search, else a grid is used. */
export function fitNonlinear(problem: NonlinearProblem, kGuess?: number): NonlinearFit {
  if (problem.map === undefined && problem.S0 === undefined) throw new Error("fitting Sinf needs S0");
  const goodGuess = kGuess !== undefined && kGuess > 0 && Number.isFinite(kGuess);
  const start = goodGuess ? { k: kGuess, span: problem.map ? 0 : profiledSpan(problem, kGuess) } : gridStart(problem);

  const sample = strided(problem, Math.max(1, Math.ceil(problem.t.length / SEARCH_POINTS)));
  let lm = searchWithLibrary(sample, start, SEARCH_ITERATIONS);
  let polished = polish(problem, lm.k, lm.span);
  let iterations = lm.iterations + polished.steps;
  if (!polished.converged) {
    lm = searchWithLibrary(problem, { k: polished.k, span: polished.span }, 6 * SEARCH_ITERATIONS);
    polished = polish(problem, lm.k, lm.span);
    iterations += lm.iterations + polished.steps;
  }
  return finish(problem, polished, iterations);
}

/** Levenberg-Marquardt (library) in scaled parameters, so its fixed damping suits every data set. */
function searchWithLibrary(
  problem: NonlinearProblem,
  start: { k: number; span: number },
  maxIterations: number,
): { k: number; span: number; iterations: number } {
  const { law, feed, t, values, map } = problem;
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
  const r = levenbergMarquardt({ x: t, y }, model, {
    initialValues: map ? [1] : [1, start.span / spanScale],
    jacobianFunction: jacobian,
    maxIterations,
    errorTolerance: 0,
    damping: 1e-3,
    minValues: map ? [0] : [0, -Number.MAX_VALUE],
    maxValues: map ? [Number.MAX_VALUE] : [Number.MAX_VALUE, Number.MAX_VALUE],
  });
  const p = r.parameterValues;
  return { k: p[0] * kScale, span: map ? 0 : p[1] * spanScale, iterations: r.iterations };
}

interface Pass {
  sse: number;
  /** J'J entries for (k, span) and J'r */
  jkk: number;
  jks: number;
  jss: number;
  jkr: number;
  jsr: number;
}

/** One pass over the data: residuals, SSE and the normal-equation sums at (k, span). */
function pass(problem: NonlinearProblem, k: number, span: number, residuals: Float64Array): Pass {
  const { law, feed, t, values, map } = problem;
  const reach = maxReactedA(feed);
  const S0 = problem.S0 ?? 0;
  let sse = 0;
  let jkk = 0;
  let jks = 0;
  let jss = 0;
  let jkr = 0;
  let jsr = 0;
  for (let i = 0; i < t.length; i++) {
    const c = concentrationA(law, feed, k, t[i]);
    const dc = concentrationASensitivity(law, feed, k, t[i]);
    let predicted: number;
    let dk: number;
    let ds = 0;
    if (map) {
      predicted = map.offset + map.slope * c;
      dk = map.slope * dc;
    } else {
      ds = (feed.CA0 - c) / reach;
      predicted = S0 + span * ds;
      dk = (-span / reach) * dc;
    }
    const r = values[i] - predicted;
    residuals[i] = r;
    sse += r * r;
    jkk += dk * dk;
    jks += dk * ds;
    jss += ds * ds;
    jkr += dk * r;
    jsr += ds * r;
  }
  return { sse, jkk, jks, jss, jkr, jsr };
}

interface Polished {
  k: number;
  span: number;
  steps: number;
  converged: boolean;
  at: Pass;
  residuals: Float64Array;
}

/** Gauss-Newton steps on the full data, halving a step that does not lower the SSE. */
function polish(problem: NonlinearProblem, k: number, span: number): Polished {
  const free = problem.map === undefined;
  let residuals = new Float64Array(problem.t.length);
  let scratch = new Float64Array(problem.t.length);
  let current = pass(problem, k, span, residuals);
  for (let step = 0; step < MAX_POLISH_STEPS; step++) {
    let dk: number;
    let ds = 0;
    if (free) {
      const det = current.jkk * current.jss - current.jks * current.jks;
      dk = (current.jss * current.jkr - current.jks * current.jsr) / det;
      ds = (current.jkk * current.jsr - current.jks * current.jkr) / det;
    } else {
      dk = current.jkr / current.jkk;
    }
    if (!Number.isFinite(dk) || !Number.isFinite(ds)) break;
    // Done when the step left is negligible against k itself or against its standard error
    // (below that, SSE changes are lost in rounding and cannot confirm a step).
    const se = standardErrors(current, problem.t.length, free);
    if (
      Math.abs(dk) <= Math.max(RELATIVE_STEP_TOLERANCE * k, STDERR_STEP_TOLERANCE * se.k) &&
      Math.abs(ds) <= Math.max(RELATIVE_STEP_TOLERANCE * Math.abs(span), STDERR_STEP_TOLERANCE * se.span)
    ) {
      return { k, span, steps: step, converged: true, at: current, residuals };
    }
    let accepted = false;
    for (let halving = 0, scale = 1; halving < 30 && !accepted; halving++, scale /= 2) {
      const kNew = k + scale * dk;
      if (!(kNew > 0)) continue;
      const next = pass(problem, kNew, span + scale * ds, scratch);
      if (next.sse <= current.sse) {
        k = kNew;
        span += scale * ds;
        current = next;
        [residuals, scratch] = [scratch, residuals];
        accepted = true;
      }
    }
    if (!accepted) break;
  }
  return { k, span, steps: MAX_POLISH_STEPS, converged: false, at: current, residuals };
}

/** Standard errors of k and span from the covariance s^2 (J'J)^-1. */
function standardErrors(at: Pass, n: number, free: boolean): { k: number; span: number; dof: number } {
  const dof = n - (free ? 2 : 1);
  const variance = dof > 0 ? at.sse / dof : NaN;
  if (!free) return { k: Math.sqrt(variance / at.jkk), span: 0, dof };
  const det = at.jkk * at.jss - at.jks * at.jks;
  return { k: Math.sqrt((variance * at.jss) / det), span: Math.sqrt((variance * at.jkk) / det), dof };
}

function finish(problem: NonlinearProblem, p: Polished, iterations: number): NonlinearFit {
  const free = problem.map === undefined;
  const se = standardErrors(p.at, problem.t.length, free);
  const fit: NonlinearFit = {
    k: p.k,
    kStdErr: se.k,
    kCI95: confidenceInterval(p.k, se.k, se.dof),
    sse: p.at.sse,
    residualStdDev: Math.sqrt(se.dof > 0 ? p.at.sse / se.dof : NaN),
    dof: se.dof,
    residuals: Array.from(p.residuals),
    iterations,
    converged: p.converged,
  };
  if (free) {
    const value = (problem.S0 ?? 0) + p.span;
    fit.Sinf = { value, stdErr: se.span, ci95: confidenceInterval(value, se.span, se.dof) };
  }
  return fit;
}

/** Least-squares signal span Sinf - S0 for a fixed k (the model is linear in it). */
function profiledSpan(problem: NonlinearProblem, k: number): number {
  const { law, feed, t, values } = problem;
  const reach = maxReactedA(feed);
  const S0 = problem.S0 ?? 0;
  let sff = 0;
  let sfy = 0;
  for (let i = 0; i < t.length; i++) {
    const f = (feed.CA0 - concentrationA(law, feed, k, t[i])) / reach;
    sff += f * f;
    sfy += f * (values[i] - S0);
  }
  return sff > 0 ? sfy / sff : 0;
}

/** Coarse search over k on a log grid around the natural time scale of the run. */
function gridStart(problem: NonlinearProblem): { k: number; span: number } {
  const { law, feed, map } = problem;
  const sample = strided(problem, Math.max(1, Math.ceil(problem.t.length / SEARCH_POINTS)));
  const { t, values } = sample;
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
      sse += r * r;
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
  const n = problem.t.length;
  for (let i = 0; i < n; i += stride) {
    t.push(problem.t[i]);
    values.push(problem.values[i]);
  }
  if ((n - 1) % stride !== 0) {
    t.push(problem.t[n - 1]);
    values.push(problem.values[n - 1]);
  }
  return { ...problem, t, values };
}
