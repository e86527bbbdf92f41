// The planning form's rubric as a person reads it: defaults that agree with the marking defaults,
// both checks in marks out of 100 with their bands, what is saved is what marking reads, and the
// live example worked out by the real marking (simulated runs through the engine).
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { Course } from "~/.server/db/models.server";
import { DEFAULT_RUBRIC as STORED_DEFAULT, LabSession } from "~/.server/db/lab-sessions.server";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { action as designAction, loader as designLoader } from "~/routes/courses/session-new";
import { DEFAULT_RUBRIC, rubricFrom } from "~/lib/marking/rubric";
import { marksOutOf } from "~/lib/marking/rubric-view";
import { call, demoCookie, payloadOf, request, statusOf } from "./helpers";

let course: Course;
let instructor: string;
let system: ReactionSystem;

beforeAll(async () => {
  course = (await Course.findOne({ where: { code: "KIN-DEMO" } }))!;
  instructor = await demoCookie("instructor");
  system = (await ReactionSystem.findOne({ where: { courseId: course.id }, order: [["id", "ASC"]] }))!;
});
afterAll(() => closeSequelize());

const params = () => ({ courseId: String(course.id) });
const rubricFields = (over: Record<string, string> = {}) => ({
  fullWithinPct: "10", partialWithinPct: "25", partialFraction: "0.5",
  analysisMarks: "40", analysisFullWithinPct: "2", analysisPartialWithinPct: "10", analysisPartialFraction: "0.5",
  latePenaltyPct: "10", correctionCostPct: "10", ...over,
});

describe("the planning form's rubric", () => {
  test("the form's defaults are the marking defaults: 60 experiment and 40 analysis marks, the analysis bands included", async () => {
    // before this change the form said analysis weight 0.7 (70 marks) while marking defaulted to 40
    const stored = rubricFrom(STORED_DEFAULT);
    expect(marksOutOf(stored)).toEqual(marksOutOf(DEFAULT_RUBRIC));
    expect(marksOutOf(stored)).toEqual({ experiment: 60, analysis: 40 });
    expect({ ...stored.experiment, weight: 0 }).toEqual({ ...DEFAULT_RUBRIC.experiment, weight: 0 });
    expect({ ...stored.analysis, weight: 0 }).toEqual({ ...DEFAULT_RUBRIC.analysis, weight: 0 });
    expect(stored.correctionCostPct).toBe(DEFAULT_RUBRIC.correctionCostPct);
    const page = payloadOf(await call(designLoader, request(`/courses/${course.id}/sessions/new`, { cookie: instructor }), params()));
    expect(page.defaults.analysisMarks).toBe("40");
    expect(page.defaults.analysisFullWithinPct).toBe(String(DEFAULT_RUBRIC.analysis.fullWithinPct));
    expect(page.defaults.analysisPartialWithinPct).toBe(String(DEFAULT_RUBRIC.analysis.partialWithinPct));
    expect(page.defaults.fullWithinPct).toBe(String(DEFAULT_RUBRIC.experiment.fullWithinPct));
    expect(page.example.outOf).toEqual({ experiment: 60, analysis: 40 });
  });

  test("the live example is the engine's marking of invented runs under the rubric being edited", async () => {
    const ask = async (over: Record<string, string>) => {
      const res = await call(designAction, request(`/courses/${course.id}/sessions/new`, { cookie: instructor, form: { intent: "example", reactionSystemId: String(system.id), ...rubricFields(over) } }), params());
      expect(statusOf(res)).toBe(200);
      return payloadOf(res).example as { outOf: { experiment: number; analysis: number }; runs: Array<{ key: string; experimentPart: number; analysisPart: number; correctionCost: number; mark: number }> };
    };
    const byKey = (e: Awaited<ReturnType<typeof ask>>) => Object.fromEntries(e.runs.map((r) => [r.key, r]));
    const d = byKey(await ask({}));
    // A careful run: both checks in their full band, so every mark (the bands' rule, common practice, no source).
    expect(d.perfect.mark).toBe(100);
    // The wrong linearised form: the experiment check is unaffected (the engine fits the readings
    // itself), the group's k is far from its own correct line, so the analysis check gives nothing.
    expect(d["wrong-line"].experimentPart).toBe(60);
    expect(d["wrong-line"].analysisPart).toBe(0);
    // A factor-1000 unit slip puts the marking k far outside every band.
    expect(d["unit-slip"].experimentPart).toBe(0);
    // Corrected by a reviewer: the experiment marks come back, less the practical's 10 % per slip.
    expect(d["unit-slip-corrected"].experimentPart).toBe(60);
    const before = d["unit-slip-corrected"].experimentPart + d["unit-slip-corrected"].analysisPart;
    expect(d["unit-slip-corrected"].correctionCost).toBeCloseTo(before * 0.1, 6);
    expect(d["unit-slip-corrected"].mark).toBeCloseTo(before * 0.9, 6);

    // Editing the rubric changes the example: 70 analysis marks leave the wrong line 30, a free correction costs nothing.
    const e = await ask({ analysisMarks: "70", correctionCostPct: "0" });
    expect(e.outOf).toEqual({ experiment: 30, analysis: 70 });
    const w = byKey(e);
    expect(w["wrong-line"].mark).toBe(30);
    expect(w["unit-slip-corrected"].correctionCost).toBe(0);
    // a narrower analysis band changes nothing for the careful run (its k is its own line's, to 4 digits)
    expect(byKey(await ask({ analysisFullWithinPct: "0.5", analysisPartialWithinPct: "1" })).perfect.mark).toBe(100);
  });

  test("bad rubric fields give no example and a message; the saved rubric is what marking reads", async () => {
    const bad = payloadOf(await call(designAction, request(`/courses/${course.id}/sessions/new`, { cookie: instructor, form: { intent: "example", reactionSystemId: String(system.id), ...rubricFields({ analysisMarks: "140" }) } }), params()));
    expect(bad.example).toBeNull();
    expect(bad.problem).toContain("rubric");

    const form: Record<string, string> = {
      intent: "save", title: "Rubric in marks (test, invented)", date: "2027-04-01", reactionSystemId: String(system.id), slotMinutes: "180", setupMinutes: "30",
      reactorVolumeMl: "250", stockAMolL: "0.1", stockBMolL: "0.1", samplingIntervalS: "60", targetConversionPct: "80",
      ...rubricFields({ analysisMarks: "25", analysisFullWithinPct: "3", analysisPartialWithinPct: "12", analysisPartialFraction: "0.25", correctionCostPct: "5" }),
      "benches[0].label": "1", "benches[0].CA0": "0.01", "benches[0].CB0": "0.015", "benches[0].temperatureC": "25",
    };
    const saved = await call(designAction, request(`/courses/${course.id}/sessions/new`, { cookie: instructor, form }), params());
    expect(saved.status).toBe(302);
    const session = (await LabSession.findByPk(Number(saved.headers.get("Location").split("/").pop())))!;
    const marking = rubricFrom(session.rubric);
    expect(marksOutOf(marking)).toEqual({ experiment: 75, analysis: 25 });
    expect(marking.analysis).toMatchObject({ fullWithinPct: 3, partialWithinPct: 12, partialFraction: 0.25 });
    expect(marking.correctionCostPct).toBe(5);

    const crossed = payloadOf(await call(designAction, request(`/courses/${course.id}/sessions/new`, { cookie: instructor, form: { ...form, analysisFullWithinPct: "12", analysisPartialWithinPct: "3" } }), params()));
    expect(crossed.result.error.analysisPartialWithinPct[0]).toContain("at least as far as full marks");
  });
});
