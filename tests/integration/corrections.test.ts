// Corrections, not just overrides: a reviewer re-marks a version with a stated correction (a
// unit, swapped columns, a reading left out); the engine marks the corrected readings, the
// practical's policy prices the slip, the group's feedback says so and the audit log has it.
// Runs are simulated from the textbook integrated rate law for A + B, first order in each
// (simulate.ts, closed forms) with seeded noise; the reference k at each bench is the Arrhenius
// equation on the fixture's invented reference (practical-fixture.ts).
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { loader as feedbackPage } from "~/routes/submissions/submission";
import { action as reviewAction, loader as reviewPage } from "~/routes/sessions/review-submission";
import { action as queueAction } from "~/routes/sessions/review";
import { AuditEntry } from "~/.server/db/models.server";
import { Submission, SubmissionFile } from "~/.server/db/submissions.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { runCsv, simulateRun, type SimulatedRun } from "~/lib/marking/simulate";
import { call, payloadOf, request, statusOf } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";

let p: Practical;
let cookies: string[];
let staff: string;

const RUBRIC = { fullWithinPct: 10, partialWithinPct: 25, partialFraction: 0.5, analysisWeight: 0.4, experimentWeight: 0.6, latePenaltyPct: 10, correctionCostPct: 10 };

beforeAll(async () => {
  p = await makePractical("CORR-T", { groups: 3, rubric: RUBRIC });
  cookies = await Promise.all(p.students.map((s) => p.cookie(s)));
  staff = await p.cookie(p.instructor);
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

function runAt(g: number, mistake: "none" | "mmol-as-mol", seed: number): SimulatedRun {
  const bench = p.benches[g];
  return simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: 20, seed, mistake });
}

async function send(g: number, csv: string, run: SimulatedRun, fields: Record<string, string> = {}) {
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[g].id}/submissions`, cookies[g], { bytes: csv, name: "readings.csv" }, {
    reportedK: String(run.reportedK), reportedMethod: run.reportedMethod, measured: "concentrationA", ...fields,
  }), { groupId: String(p.groups[g].id) });
  expect(res.status).toBe(202);
  const id = ((await res.json()) as { id: number }).id;
  await runJobsUntilIdle();
  return id;
}

const pageParams = (id: number) => ({ sessionId: String(p.session.id), submissionId: String(id) });
const correct = (id: number, form: Record<string, string>) => call(reviewAction, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff, form: { intent: "correct", ...form } }), pageParams(id));

describe("a reviewer's correction", () => {
  test("a unit-slip upload corrected to mmol/L is marked again by the engine, priced by the practical, told to the group and audited", async () => {
    const run = runAt(0, "mmol-as-mol", 21);
    const id = await send(0, runCsv(run), run);
    const before = (await Submission.findByPk(id))!;
    expect(before.concentrationUnit).toBe("mol/L"); // the header said mol/L
    expect(before.status).toBe("marked");
    expect(before.experimentPart).toBe(0); // factor 1000 off the reference: nothing for the experiment
    const sha = (await SubmissionFile.findByPk(id))!.sha256;

    const answer = payloadOf(await correct(id, { kind: "concentration-unit", toConcentration: "mmol/L", reason: "the column holds mmol/L" }));
    expect(answer.ok).toContain("concentration unit mol/L → mmol/L");

    const after = (await Submission.findByPk(id))!;
    expect(after.concentrationUnit).toBe("mmol/L");
    expect(after.corrections).toHaveLength(1);
    expect(after.corrections[0]).toMatchObject({ kind: "concentration-unit", from: "mol/L", to: "mmol/L", reason: "the column holds mmol/L" });
    // the engine's k of the corrected readings is within the full band of the Arrhenius reference at the bench
    const kRef = p.kAt(p.benches[0]);
    expect(Math.abs(after.checks!.kMarking - kRef) / kRef).toBeLessThan(0.1);
    expect(after.checks!.kRefAtT).toBeCloseTo(kRef, 10);
    expect(after.experimentPart).toBe(60);
    // the practical's policy: 10 % of the mark for the one corrected slip
    const whole = after.experimentPart! + after.analysisPart!;
    expect(after.checks!.correction).toEqual({ count: 1, pctEach: 10, marks: Math.round(whole * 0.1 * 100) / 100 });
    expect(after.autoMark).toBeCloseTo(whole * 0.9, 6);
    expect((after.flags ?? []).some((f) => f.code === "unit-slip")).toBe(false);
    // the group is told in its feedback
    const told = after.feedback.find((l) => l.startsWith("A reviewer corrected your upload"));
    expect(told).toContain("concentration unit mol/L → mmol/L (the column holds mmol/L)");
    expect(told).toContain("10 % of the mark");
    // the original file is as it was uploaded
    expect((await SubmissionFile.findByPk(id))!.sha256).toBe(sha);
    // the audit log has before and after
    const audit = await AuditEntry.findOne({ where: { entityType: "submission", entityId: String(id), action: "submission.corrected" } });
    expect(audit).toBeTruthy();
    expect((audit!.before as { concentrationUnit: string; autoMark: number }).concentrationUnit).toBe("mol/L");
    expect((audit!.before as { autoMark: number }).autoMark).toBe(before.autoMark);
    expect((audit!.after as { autoMark: number; text: string }).autoMark).toBe(after.autoMark);
    expect((audit!.after as { text: string }).text).toBe("concentration unit mol/L → mmol/L");

    // the review page lists it and shows the cost; after release the group's page carries the line
    const page = payloadOf(await call(reviewPage, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff }), pageParams(id)));
    expect(page.view.corrections).toHaveLength(1);
    expect(page.correctionCostPct).toBe(10);
    const released = await call(queueAction, request(`/sessions/${p.session.id}/review`, { cookie: staff, form: { intent: "release" } }), { sessionId: String(p.session.id) });
    expect(statusOf(released)).toBeLessThan(400);
    const studentView = payloadOf(await call(feedbackPage, request(`/submissions/${id}`, { cookie: cookies[0] }), { submissionId: String(id) }));
    expect(studentView.view.feedback.join(" ")).toContain("A reviewer corrected your upload: concentration unit mol/L → mmol/L");
    expect(studentView.view.mark).toBe(after.autoMark);

    // a leave-out re-mark later keeps the correction and its price
    const row = after.readings!.rowNumbers[3];
    payloadOf(await call(reviewAction, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff, form: { intent: "exclude", row: String(row), reason: "checked by hand" } }), pageParams(id)));
    const later = (await Submission.findByPk(id))!;
    expect(later.concentrationUnit).toBe("mmol/L");
    expect(later.checks!.correction!.count).toBe(1);
  });

  test("swapped columns are read again from the original file and marked; a reading left out as a correction is charged and put back free", async () => {
    const run = runAt(1, "none", 33);
    // the group wrote the value column first and the time second, under each other's headers
    const swapped = ["t / min,CA (mmol/L)", ...run.rows.map((r) => `${r[1]},${r[0]}`)].join("\n") + "\n";
    const id = await send(1, swapped, run, { timeUnit: "min", concentrationUnit: "mmol/L" });
    const before = (await Submission.findByPk(id))!;
    expect(before.readings!.time.letter).toBe("A");
    expect(before.readings!.points[0]).toEqual([run.rows[0][1], run.rows[0][0]]);

    payloadOf(await correct(id, { kind: "swapped-columns", reason: "time is in column B" }));
    const after = (await Submission.findByPk(id))!;
    expect(after.readings!.time.letter).toBe("B");
    expect(after.readings!.value.letter).toBe("A");
    expect(after.readings!.points[0]).toEqual([run.rows[0][0], run.rows[0][1]]);
    expect(after.status).toBe("marked");
    expect(after.experimentPart).toBe(60);
    expect(after.corrections[0]).toMatchObject({ kind: "swapped-columns", from: "A, B", to: "B, A" });

    const row = after.readings!.rowNumbers[5];
    payloadOf(await correct(id, { kind: "reading-left-out", toRow: String(row), reason: "the group's own note says this one was spilt" }));
    const left = (await Submission.findByPk(id))!;
    expect(left.excluded.map((e) => e.row)).toEqual([row]);
    expect(left.checks!.correction!.count).toBe(2);
    expect(left.feedback.join(" ")).toContain(`row ${row} of the file left out (the group's own note says this one was spilt)`);
    payloadOf(await call(reviewAction, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff, form: { intent: "include", row: String(row) } }), pageParams(id)));
    const back = (await Submission.findByPk(id))!;
    expect(back.corrections.map((c) => c.kind)).toEqual(["swapped-columns"]);
    expect(back.checks!.correction!.count).toBe(1);
  });

  test("a correction without a reason, to the unit already used, or naming a row the file lacks is refused beside its form and changes nothing", async () => {
    const run = runAt(2, "none", 41);
    const id = await send(2, runCsv(run), run);
    const s0 = (await Submission.findByPk(id))!;
    const noReason = await correct(id, { kind: "time-unit", toTime: "s", reason: " " });
    expect(statusOf(noReason)).toBe(400);
    expect(payloadOf(noReason)).toMatchObject({ field: "correct" });
    expect(payloadOf(noReason).error).toContain("Say why");
    const same = await correct(id, { kind: "concentration-unit", toConcentration: "mmol/L", reason: "x" });
    expect(statusOf(same)).toBe(409);
    expect(payloadOf(same).error).toContain("already taken as mmol/L");
    const badRow = await correct(id, { kind: "reading-left-out", toRow: "999", reason: "x" });
    expect(statusOf(badRow)).toBe(400);
    expect(payloadOf(badRow).error).toContain("Row 999 is not one of this file's readings");
    const badCols = await correct(id, { kind: "columns", toColumns: "B", reason: "x" });
    expect(payloadOf(badCols).error).toContain("two column letters");
    const s1 = (await Submission.findByPk(id))!;
    expect(s1.corrections).toEqual([]);
    expect(s1.autoMark).toBe(s0.autoMark);
    expect(await AuditEntry.count({ where: { entityType: "submission", entityId: String(id), action: "submission.corrected" } })).toBe(0);
  });
});
