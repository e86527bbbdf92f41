import { describe, expect, it } from "vitest";
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { fitNonlinear } from "./nonlinearFit.ts";
import { RATE_LAWS, concentrationA, type Feed } from "./rateLaws.ts";
import { fromCA, measurementMap, signalMap } from "./measurement.ts";
import { exactRun, normalSource, withNoise } from "./synthetic.ts";

const feeds: Feed[] = [
  { CA0: 0.02, CB0: 0.03, nu: 1 },
  { CA0: 0.02, CB0: 0.02, nu: 2 },
  { CA0: 0.02, CB0: 0.04, nu: 2 },
];

describe("nonlinear fit of the integrated law to the measured values", () => {
  for (const law of RATE_LAWS) {
    for (const feed of feeds) {
      it(`${law}, CB0/(nu CA0) = ${(feed.CB0 / (feed.nu * feed.CA0)).toFixed(2)}: exact data (known k) give k back`, () => {
        const k = law === "first-order" ? 2e-3 : 0.11;
        const run = exactRun(law, feed, k, 1500, 40);
        const map = measurementMap({ kind: "concentrationB" }, feed);
        const values = run.CA.map((c) => fromCA(map, c));
        // from a start 30 % off, and from no start at all (grid search)
        for (const guess of [k * 1.3, undefined]) {
          const fit = fitNonlinear({ law, feed, t: run.t, values, map }, guess);
          expect(fit.k / k).toBeCloseTo(1, 9);
          expect(fit.converged).toBe(true);
          expect(Math.sqrt(fit.sse / run.t.length)).toBeLessThan(1e-10 * feed.CA0);
        }
      });
    }
  }

  it("fits Sinf as a second parameter when the final signal was not measured (exact data, known k)", () => {
    const feed = feeds[1];
    const k = 0.11;
    const run = exactRun("second-order-AB", feed, k, 3000, 60);
    const map = signalMap(2.4, 0.9, feed);
    const values = run.CA.map((c) => fromCA(map, c));
    const fit = fitNonlinear({ law: "second-order-AB", feed, t: run.t, values, S0: 2.4 });
    expect(fit.k / k).toBeCloseTo(1, 8);
    expect(fit.Sinf!.value).toBeCloseTo(0.9, 9);
    expect(fit.dof).toBe(58);
  });

  it("on a long record it reaches the same optimum as the library run on all the points", () => {
    // The search runs on a subsample and is finished with full-data steps; the reference is
    // ml-levenberg-marquardt iterated to convergence on every point (seeded synthetic data).
    const feed = feeds[0];
    const k = 0.11;
    const run = exactRun("second-order-AB", feed, k, 2000, 3000);
    const values = withNoise(run.CA, 2e-4, normalSource(7));
    const fit = fitNonlinear({ law: "second-order-AB", feed, t: run.t, values, map: { offset: 0, slope: 1 } }, 0.1);
    const scale = 1 / feed.CA0;
    const ref = levenbergMarquardt(
      { x: run.t, y: values.map((v) => v * scale) },
      ([p]) => (t) => concentrationA("second-order-AB", feed, p * 0.1, t) * scale,
      { initialValues: [1], maxIterations: 200, errorTolerance: 0, improvementThreshold: 1e-3, gradientDifference: 1e-7, centralDifference: true },
    );
    // the refinement stops once the step left is below 1e-4 of k's standard error
    expect(Math.abs(fit.k - ref.parameterValues[0] * 0.1)).toBeLessThan(1e-3 * fit.kStdErr);
  });

  it("on a long record with a law that does not fit (large residuals) it still reaches the library's optimum", () => {
    // first-order law fitted to A + B data, 8,000 points, seeded noise; reference as above
    const feed = feeds[0];
    const run = exactRun("second-order-AB", feed, 0.11, 2000, 8000);
    const values = withNoise(run.CA, 2e-4, normalSource(8));
    const fit = fitNonlinear({ law: "first-order", feed, t: run.t, values, map: { offset: 0, slope: 1 } });
    const kScale = fit.k;
    const ref = levenbergMarquardt(
      { x: run.t, y: values.map((v) => v / feed.CA0) },
      ([p]) => (t) => concentrationA("first-order", feed, p * kScale * 0.8, t) / feed.CA0,
      { initialValues: [1], maxIterations: 100, errorTolerance: 0, gradientDifference: 1e-7, centralDifference: true },
    );
    const kRef = ref.parameterValues[0] * kScale * 0.8;
    expect(fit.converged).toBe(true);
    expect(Math.abs(fit.k - kRef)).toBeLessThan(0.01 * fit.kStdErr + 1e-9 * kRef);
  });

  it("with Sinf fitted on a long record it agrees with the library fitting both parameters on all points", () => {
    const feed = feeds[2];
    const run = exactRun("second-order-AB", feed, 0.11, 2500, 6000);
    const map = signalMap(2.4, 0.9, feed);
    const values = withNoise(run.CA.map((c) => fromCA(map, c)), 3e-3, normalSource(9));
    const fit = fitNonlinear({ law: "second-order-AB", feed, t: run.t, values, S0: 2.4 });
    const reach = 0.02;
    const ref = levenbergMarquardt(
      { x: run.t, y: values },
      ([p, span]) => (t) => 2.4 + (span * (feed.CA0 - concentrationA("second-order-AB", feed, p * 0.1, t))) / reach,
      { initialValues: [1, -1], maxIterations: 200, errorTolerance: 0, gradientDifference: [1e-7, 1e-7], centralDifference: true },
    );
    expect(Math.abs(fit.k - ref.parameterValues[0] * 0.1)).toBeLessThan(0.01 * fit.kStdErr);
    expect(Math.abs(fit.Sinf!.value - (2.4 + ref.parameterValues[1]))).toBeLessThan(0.01 * fit.Sinf!.stdErr);
  });

  it("standard error from the Jacobian matches the scatter of k over seeded repetitions (synthetic, known k)", () => {
    const feed = feeds[0];
    const k = 0.11;
    const run = exactRun("second-order-AB", feed, k, 1500, 30);
    const normal = normalSource(11);
    const ks: number[] = [];
    const ses: number[] = [];
    for (let rep = 0; rep < 400; rep++) {
      const fit = fitNonlinear({ law: "second-order-AB", feed, t: run.t, values: withNoise(run.CA, 1e-4, normal), map: { offset: 0, slope: 1 } }, k);
      ks.push(fit.k);
      ses.push(fit.kStdErr);
    }
    const mean = ks.reduce((a, b) => a + b) / ks.length;
    const sd = Math.sqrt(ks.reduce((a, b) => a + (b - mean) ** 2, 0) / (ks.length - 1));
    const meanSe = ses.reduce((a, b) => a + b) / ses.length;
    // 400 repetitions pin the scatter to about +/- 4 % (1/sqrt(2 * 400)); allow 10 %
    expect(meanSe / sd).toBeGreaterThan(0.9);
    expect(meanSe / sd).toBeLessThan(1.1);
    expect(Math.abs(mean - k) / k).toBeLessThan(3 * sd / Math.sqrt(ks.length) / k);
  });
});
