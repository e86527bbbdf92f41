// Seeded synthetic runs with a known k, for demos, statistical tests and benchmarks.
// Never used to mark real data.

import { mersenne } from "pure-rand/generator/mersenne";
import { uniformFloat64 } from "pure-rand/distribution/uniformFloat64";
import { concentrationA, type Feed, type RateLaw } from "./rateLaws.ts";

/**
 * Standard normal deviates from a seeded generator (Box-Muller on pure-rand uniforms).
 * Mersenne Twister, because xoroshiro128+ seeded with a small integer gives correlated first
 * outputs (seen here: first deviates of -5.5 and 5.2 for seeds 1 and 7).
 */
export function normalSource(seed: number): () => number {
  const rng = mersenne(seed);
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const z = spare;
      spare = null;
      return z;
    }
    const u = 1 - uniformFloat64(rng); // (0, 1]: log(u) is finite
    const v = uniformFloat64(rng);
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

export interface SyntheticRun {
  /** times, s */
  t: number[];
  /** true CA, mol/L */
  CA: number[];
}

/** Evenly spaced exact CA(t) from the closed form, t from 0 to tEnd (s). */
export function exactRun(law: RateLaw, feed: Feed, k: number, tEnd: number, n: number): SyntheticRun {
  const t: number[] = [];
  const CA: number[] = [];
  for (let i = 0; i < n; i++) {
    const ti = (tEnd * i) / (n - 1);
    t.push(ti);
    CA.push(concentrationA(law, feed, k, ti));
  }
  return { t, CA };
}

/** Adds independent normal noise of standard deviation sd to each value. */
export function withNoise(values: readonly number[], sd: number, normal: () => number): number[] {
  return values.map((v) => v + sd * normal());
}
