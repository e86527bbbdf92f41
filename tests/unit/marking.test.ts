// Marking arithmetic against figures worked by hand, and whole runs made from a known k with the
// textbook closed form of the rate law (the engine's job is to find it back).
import { describe, expect, test } from "vitest";
import { linearRegression } from "simple-statistics";
import { analysisCheck, combine, deviationPct, experimentCheck, scoreBand } from "~/lib/marking/marks";
import { DEFAULT_RUBRIC, rubricFrom } from "~/lib/marking/rubric";
import { feedbackLines, flagFeedback } from "~/lib/marking/feedback";
import { markRun, previewRun, type MarkingContext, type RunInput } from "~/lib/marking/mark-run";
import { normalSource } from "~/lib/kinetics/synthetic";

const R = DEFAULT_RUBRIC; // experiment 60 (full within 10 %, half within 25 %), analysis 40 (full 2 %, half 10 %), late 10 %

describe("bands, weights, late penalty (worked by hand)", () => {
  test("deviation in percent of the value compared against", () => {
    expect(deviationPct(0.105, 0.1)).toBeCloseTo(5, 10);
    expect(deviationPct(0.09, 0.1)).toBeCloseTo(-10, 10);
    expect(Number.isNaN(deviationPct(1, 0))).toBe(true);
  });

  test("full within the first band (edge included), partial within the second, none beyond", () => {
    expect(scoreBand(10, R.experiment)).toMatchObject({ band: "full", score: 1 });
    expect(scoreBand(-10.01, R.experiment)).toMatchObject({ band: "partial", score: 0.5 });
    expect(scoreBand(25, R.experiment)).toMatchObject({ band: "partial", score: 0.5 });
    expect(scoreBand(25.5, R.experiment)).toMatchObject({ band: "none", score: 0 });
    expect(scoreBand(NaN, R.experiment)).toMatchObject({ band: "none", score: 0 });
  });

  test("k 5 % high and a reported k 1 % low: 60 + 40 = 100; late: 100 - 10 = 90", () => {
    const e = experimentCheck(0.105, 0.1, R);
    const a = analysisCheck(0.099, 0.1, R);
    expect(combine(e, a, R, false)).toEqual({ experimentPart: 60, analysisPart: 40, latePenalty: 0, mark: 100 });
    expect(combine(e, a, R, true)).toEqual({ experimentPart: 60, analysisPart: 40, latePenalty: 10, mark: 90 });
  });

  test("k 18 % high and a reported k 5 % low: 30 + 20 = 50; late: 50 - 5 = 45", () => {
    const e = experimentCheck(0.118, 0.1, R);
    const a = analysisCheck(0.095, 0.1, R);
    expect(e.band).toBe("partial");
    expect(combine(e, a, R, false).mark).toBe(50);
    expect(combine(e, a, R, true)).toEqual({ experimentPart: 30, analysisPart: 20, latePenalty: 5, mark: 45 });
  });

  test("k 30 % off and no reported k: 0", () => {
    expect(combine(experimentCheck(0.13, 0.1, R), analysisCheck(null, 0.1, R), R, false).mark).toBe(0);
  });

  test("weights 3 : 1 give the experiment three quarters", () => {
    const r = rubricFrom({ experiment: { weight: 3 }, analysis: { weight: 1 } });
    const parts = combine(experimentCheck(0.1, 0.1, r), analysisCheck(0.2, 0.1, r), r, false);
    expect(parts).toMatchObject({ experimentPart: 75, analysisPart: 0, mark: 75 });
  });

  test("a rubric read from JSON keeps what it gives and defaults the rest", () => {
    const r = rubricFrom({ experiment: { fullWithinPct: 5, partialWithinPct: 15 }, latePenaltyPct: 20 });
    expect(r.experiment).toEqual({ weight: 60, fullWithinPct: 5, partialWithinPct: 15, partialFraction: 0.5 });
    expect(r.analysis).toEqual(DEFAULT_RUBRIC.analysis);
    expect(r.latePenaltyPct).toBe(20);
    expect(rubricFrom(null)).toEqual(DEFAULT_RUBRIC);
    // the planning form's flat shape: its bands are the experiment check's, weights 0.3 : 0.7
    const flat = rubricFrom({ fullWithinPct: 10, partialWithinPct: 25, partialFraction: 0.5, analysisWeight: 0.7, experimentWeight: 0.3, latePenaltyPct: 10 });
    expect(flat.experiment).toEqual({ weight: 0.3, fullWithinPct: 10, partialWithinPct: 25, partialFraction: 0.5 });
    expect(flat.analysis).toEqual({ ...DEFAULT_RUBRIC.analysis, weight: 0.7 });
    expect(combine(experimentCheck(0.118, 0.1, flat), analysisCheck(0.1, 0.1, flat), flat, false).mark).toBe(85); // 30 x 0.5 + 70
    expect(rubricFrom({ latePenaltyPct: 300 }).latePenaltyPct).toBe(10);
  });
});

describe("feedback lines", () => {
  test("flags become sentences for students with the file's row numbers, and name no reference", () => {
    const slip = flagFeedback({ code: "unit-slip", message: "The fitted k is 1/60.0 times the reference k, close to a unit factor: perhaps seconds entered as minutes (or minutes as hours). Check the units.", rows: [] }, []);
    expect(slip).toMatch(/perhaps seconds entered as minutes/);
    expect(slip).not.toMatch(/reference|60\.0/);
    const outlier = flagFeedback({ code: "outlier" as never, message: "", rows: [3] }, [2, 3, 4, 5, 6]);
    expect(outlier).toMatch(/^Row 5 of your file sits far from the curve/);
    expect(flagFeedback({ code: "low-conversion", message: "Only about 12 % of the limiting reagent (A) had reacted", rows: [9] }, [])).toMatch(/\(12 %\)/);
  });

  test("the wrong straight-line form for the feed is named", () => {
    const lines = feedbackLines({
      flags: [], rowNumbers: [], late: false, excludedRows: [],
      experiment: { band: "full", score: 1, deviationPct: 1 }, analysis: { band: "none", score: 0, deviationPct: -35 },
      reportedK: 0.07, reportedMethod: "1/CA - 1/CA0", expectedForm: "ln[(CB*CA0)/(CB0*CA)]",
    });
    expect(lines[0]).toMatch(/For your bench's feed the straight line is ln\[\(CB·CA0\)\/\(CB0·CA\)\].*you used 1\/CA − 1\/CA0/);
    expect(lines[1]).toMatch(/differs from the straight line through your own readings by 35.0 %/);
  });

  test("a k 1/1000 of the own line is a concentration-unit hint only where k carries a concentration unit", () => {
    // k/1000 is the slope with CA in mmol/L for a second-order law (L/(mmol·s)); a first-order k
    // (1/s) does not change with the concentration unit (common practice, no source)
    const at = (expectedForm: string, deviationPct: number) => feedbackLines({
      flags: [], rowNumbers: [], late: false, excludedRows: [],
      experiment: { band: "full", score: 1, deviationPct: 1 }, analysis: { band: "none", score: 0, deviationPct },
      reportedK: 1e-4, reportedMethod: expectedForm, expectedForm,
    }).join(" ");
    expect(at("1/CA - 1/CA0", -99.9)).toMatch(/about 1\/1000 of the slope.*Multiply it by 1000/);
    expect(at("ln[(CB*CA0)/(CB0*CA)]", (1000 * 1.05 - 1) * 100)).toMatch(/about 1000 times the slope/);
    expect(at("ln(CA0/CA)", -99.9)).toMatch(/differs from the straight line through your own readings by 99.9 %/);
    expect(at("ln(CA0/CA)", -99.9)).not.toMatch(/1000/);
    expect(at("1/CA - 1/CA0", (1 / 60 - 1) * 100)).toMatch(/about 1\/60 of the slope/);
  });
});

// A + B, first order in each, unequal feed; k at 25 °C and Ea invented for the test.
const K25 = 0.11; // L/(mol s)
const EA = 50; // kJ/mol
const ctx: MarkingContext = {
  reaction: { a: 1, b: 1, orderA: 1, orderB: 1 },
  feed: { CA0: 0.02, CB0: 0.03 },
  temperatureC: 35,
  measurement: { kind: "concentrationA" },
  reference: { k: K25, TrefC: 25, EaKJ: EA },
  rubric: DEFAULT_RUBRIC,
};
// Arrhenius, k(T) = k(Tref) exp(-Ea/R (1/T - 1/Tref)), R = 8.314462618 J/(mol K) (CODATA 2018)
const kAt35 = K25 * Math.exp((-EA * 1000 / 8.314462618) * (1 / 308.15 - 1 / 298.15));

/** Textbook integrated law for A + B, CA0 != CB0: ln[(CB CA0)/(CB0 CA)] = (CB0 - CA0) k t, solved for CA. */
function caAt(t: number, k: number) {
  const d = ctx.feed.CB0 - ctx.feed.CA0;
  const e = Math.exp(d * k * t);
  return (d * ctx.feed.CA0) / (ctx.feed.CB0 * e - ctx.feed.CA0);
}

function run(k: number, opts: { noise?: number; seed?: number; n?: number; tEndS?: number } = {}) {
  const normal = normalSource(opts.seed ?? 7);
  const n = opts.n ?? 25;
  const tEnd = opts.tEndS ?? 1800;
  const points: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    const t = (tEnd * i) / (n - 1);
    points.push([t / 60, caAt(t, k) * 1000 * (1 + (opts.noise ?? 0.004) * normal())]); // minutes, mmol/L
  }
  return points;
}

/** The group's own k by hand: least-squares slope of ln[(CB CA0)/(CB0 CA)] against t in s, over (CB0 - CA0). */
function handK(points: [number, number][]) {
  const { CA0, CB0 } = ctx.feed;
  const xy = points.map(([tMin, c]) => {
    const CA = c / 1000;
    const CB = CB0 - (CA0 - CA);
    return [tMin * 60, Math.log((CB * CA0) / (CB0 * CA))];
  });
  return linearRegression(xy).m / (CB0 - CA0);
}

const base = (points: [number, number][]): RunInput => ({
  points, rowNumbers: points.map((_, i) => i + 2), timeUnit: "min", concentrationUnit: "mmol/L", measured: "concentrationA",
  reportedK: handK(points), reportedMethod: "ln[(CB*CA0)/(CB0*CA)]", late: false, excludedRows: [],
});

describe("whole runs from a known k", () => {
  test("readings generated from the reference k at the bench's temperature score full marks", () => {
    const out = markRun(ctx, base(run(kAt35)));
    if (!out.ok) throw new Error(JSON.stringify(out.errors));
    expect(out.kRefAtT).toBeCloseTo(kAt35, 10);
    expect(Math.abs(out.experiment.deviationPct)).toBeLessThan(3);
    expect(out.parts.mark).toBe(100);
    expect(out.result.flags.map((f) => f.code)).not.toContain("unit-slip");
  });

  test("seconds recorded in a column said to be minutes: unit slip flagged, experiment part lost", () => {
    const points = run(kAt35).map(([t, c]) => [t * 60, c] as [number, number]);
    const input = { ...base(points), reportedK: handK(points) };
    const out = markRun(ctx, input);
    if (!out.ok) throw new Error("refused");
    expect(out.result.flags.map((f) => f.code)).toContain("unit-slip");
    expect(out.experiment.score).toBe(0);
    expect(out.parts.experimentPart).toBe(0);
    expect(out.feedback.join(" ")).toMatch(/seconds entered as minutes/);
  });

  test("a reported k that is not the group's own line loses the analysis part", () => {
    const points = run(kAt35);
    const out = markRun(ctx, { ...base(points), reportedK: handK(points) * 1.3 });
    if (!out.ok) throw new Error("refused");
    expect(out.analysis.band).toBe("none");
    expect(out.parts).toMatchObject({ experimentPart: 60, analysisPart: 0, mark: 60 });
  });

  test("an excluded reading is left out of the fit", () => {
    const points = run(kAt35);
    points[10] = [points[10][0], points[10][1] * 1.5];
    const withWild = markRun(ctx, base(points));
    const without = markRun(ctx, { ...base(points), excludedRows: [12] });
    if (!withWild.ok || !without.ok) throw new Error("refused");
    expect(without.result.n).toBe(points.length - 1);
    expect(Math.abs(without.kMarking - kAt35)).toBeLessThan(Math.abs(withWild.kMarking - kAt35));
    expect(without.feedback.join(" ")).toMatch(/left out row 12 of your file/);
  });

  test("the preview has no reference in it", () => {
    const p = previewRun(ctx, { points: run(kAt35), rowNumbers: [], timeUnit: "min", concentrationUnit: "mmol/L", measured: "concentrationA" });
    if (!p.ok) throw new Error("refused");
    expect(p.result.reference).toBeUndefined();
    expect(JSON.stringify(p.result)).not.toMatch(/kAtT|tolerance/);
  });
});

describe("the group's own straight line", () => {
  test("a k from the wrong straight-line form for the feed is flagged for reviewers and named in the feedback", () => {
    const points = run(kAt35);
    const out = markRun(ctx, { ...base(points), reportedMethod: "1/CA - 1/CA0" });
    if (!out.ok) throw new Error("refused");
    expect(out.result.flags.map((f) => f.code)).toContain("wrong-line-form");
    expect(out.feedback.join(" ")).toMatch(/you used 1\/CA − 1\/CA0/);
  });
});
