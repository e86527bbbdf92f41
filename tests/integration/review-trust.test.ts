// Review a marker can trust: one row numbering (the file's own rows) in the staff flag, the
// group's feedback, the plot tooltips and the leave-out form, stable through leave-out and
// re-mark; the straight-line k a group is shown equals the k its reported k was checked against;
// the queue's words, "next flagged" and "mark all unflagged as checked". Runs are simulated from
// the textbook integrated rate law (simulate.ts) with seeded noise; the wild reading is planted.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { loader as feedbackPage } from "~/routes/submissions/submission";
import { loader as queuePage, action as queueAction } from "~/routes/sessions/review";
import { loader as reviewPage, action as reviewAction } from "~/routes/sessions/review-submission";
import { AuditEntry } from "~/.server/db/models.server";
import { Submission } from "~/.server/db/submissions.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { runCsv, simulateRun, type Mistake } from "~/lib/marking/simulate";
import { analysisCheck } from "~/lib/marking/marks";
import { rubricFrom } from "~/lib/marking/rubric";
import { call, payloadOf, request } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";

let p: Practical;
let cookies: string[];
let staff: string;

beforeAll(async () => {
  p = await makePractical("TRUST-T", { groups: 4 });
  cookies = await Promise.all(p.students.map((s) => p.cookie(s)));
  staff = await p.cookie(p.instructor);
  await runJobsUntilIdle();
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

async function submitRun(g: number, mistake: Mistake, opts: { reportedK?: number; seed?: number } = {}) {
  const bench = p.benches[g];
  const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: 20, seed: opts.seed ?? 11 + g, mistake });
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[g].id}/submissions`, cookies[g], { bytes: runCsv(run), name: `${mistake}.csv` }, {
    reportedK: String(opts.reportedK ?? run.reportedK), reportedMethod: run.reportedMethod, measured: "concentrationA",
  }), { groupId: String(p.groups[g].id) });
  expect(res.status).toBe(202);
  return ((await res.json()) as { id: number }).id;
}

const pageParams = (id: number) => ({ sessionId: String(p.session.id), submissionId: String(id) });

describe("one row numbering", () => {
  test("the staff flag, the feedback, the tooltips and the form name the same file row, before and after a re-mark", async () => {
    const id = await submitRun(0, "wild-reading", { seed: 5 });
    await runJobsUntilIdle();
    const s = (await Submission.findByPk(id))!;
    // the file has a header row, so file rows start at 2 and differ from 0-based indices
    expect(s.readings!.rowNumbers[0]).toBe(2);
    const outlier = (s.flags as Array<{ code: string; message: string; rows: number[]; fileRows?: number[] }>).find((f) => f.code === "outlier")!;
    expect(outlier).toBeTruthy();
    const fileRow = s.readings!.rowNumbers[outlier.rows[0]];
    expect(outlier.fileRows).toEqual([fileRow]);
    expect(outlier.message).toMatch(new RegExp(`^Row ${fileRow} of the file `));
    expect(s.feedback.join(" ")).toMatch(new RegExp(`row ${fileRow} of your file`, "i"));

    const page = payloadOf(await call(reviewPage, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff }), pageParams(id)));
    const shown = page.flags.find((f: { code: string }) => f.code === "outlier");
    expect(shown.fileRows).toEqual([fileRow]);
    // the plot's tooltip rows are file rows: the planted reading sits at its file row
    const at = page.plots.readings.rows.indexOf(fileRow);
    expect(at).toBeGreaterThanOrEqual(0);
    expect(page.plots.readings.points[at]).toEqual(s.readings!.points[outlier.rows[0]]);

    // leave that row out by its file number (what the flag says), re-mark
    const ok = payloadOf(await call(reviewAction, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff, form: { intent: "exclude", row: String(fileRow), reason: "wild reading flagged by the engine" } }), pageParams(id)));
    expect(ok.ok).toMatch(new RegExp(`Row ${fileRow} left out`));
    const after = (await Submission.findByPk(id))!;
    expect(after.excluded.map((e) => e.row)).toEqual([fileRow]);
    // any flag raised on the re-mark names a file row still in the fit, never the left-out one
    for (const f of after.flags as unknown as Array<{ rows: number[]; fileRows: number[] }>) {
      expect(f.fileRows).not.toContain(fileRow);
      f.rows.forEach((i, j) => expect(f.fileRows[j]).toBe(after.readings!.rowNumbers.filter((r) => r !== fileRow)[i]));
    }
    expect(after.feedback.join(" ")).toMatch(new RegExp(`left out row ${fileRow} of your file`));
    // every other reading keeps its file row: later points still map to the same rows
    const again = payloadOf(await call(reviewPage, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff }), pageParams(id)));
    expect(again.plots.readings.rows).not.toContain(fileRow);
    expect(again.plots.readings.rows).toEqual(s.readings!.rowNumbers.filter((r) => r !== fileRow));
  });
});

describe("the straight line a group is shown is the one checked", () => {
  test("the feedback page's own line k equals checks.kLine, and the analysis deviation is against it", async () => {
    const id = await submitRun(1, "none", { seed: 21 });
    await runJobsUntilIdle();
    await call(queueAction, request(`/sessions/${p.session.id}/review`, { cookie: staff, form: { intent: "release" } }), { sessionId: String(p.session.id) });
    const s = (await Submission.findByPk(id))!;
    const page = payloadOf(await call(feedbackPage, request(`/submissions/${id}`, { cookie: cookies[1] }), { submissionId: String(id) }));
    expect(page.view.ownLine.k).toBe(s.checks!.kLine);
    // the analysis check recomputed from the shown number gives the stored deviation
    const again = analysisCheck(s.reportedK, page.view.ownLine.k, rubricFrom(p.session.rubric));
    expect(again.deviationPct).toBeCloseTo(s.checks!.analysis.deviationPct, 10);
    // a student who copies the shown k into a new upload of the same readings gets the full
    // analysis band from the marking job (the shown number is the one the check uses)
    const copied = await submitRun(1, "none", { seed: 21, reportedK: page.view.ownLine.k });
    await runJobsUntilIdle();
    const remarked = (await Submission.findByPk(copied))!;
    expect(remarked.status).toBe("marked");
    expect(remarked.checks!.kLine).toBe(s.checks!.kLine);
    expect(remarked.checks!.analysis.band).toBe("full");
    // parts read as marks out of the rubric's share (fixture: 0.6 / 0.4 -> 60 and 40 marks)
    expect(page.outOf).toEqual({ experiment: 60, analysis: 40 });
  });
});

describe("getting through the queue", () => {
  test("words say why, next flagged leads to the flagged one, and the bulk action checks only the unflagged it counted", async () => {
    await submitRun(2, "minutes-as-seconds", { seed: 31 });
    await submitRun(3, "none", { seed: 41 });
    await runJobsUntilIdle();
    const q = payloadOf(await call(queuePage, request(`/sessions/${p.session.id}/review`, { cookie: staff }), { sessionId: String(p.session.id) }));
    const rows = q.rows as Array<{ group: string; latest: { id: number; tab: string; words: string[] } }>;
    const slip = rows.find((r) => r.group === "G3")!;
    expect(slip.latest.tab).toBe("flagged");
    expect(slip.latest.words[0]).toBe("units");
    const clean = rows.filter((r) => r.latest && r.latest.tab === "to-check");
    expect(clean.length).toBeGreaterThan(0);
    // from G2's page, next flagged skips the clean G4... wrapping round to the flagged ones
    const g2 = rows.find((r) => r.group === "G2")!.latest.id;
    const page = payloadOf(await call(reviewPage, request(`/sessions/${p.session.id}/review/${g2}`, { cookie: staff }), pageParams(g2)));
    expect(page.around.nextFlagged.id).toBe(slip.latest.id);
    expect(page.around.previous.group).toBe("G1");

    const ids = clean.map((r) => r.latest.id).concat(slip.latest.id);
    const res = payloadOf(await call(queueAction, request(`/sessions/${p.session.id}/review`, { cookie: staff, form: { intent: "check-unflagged", ids: ids.join(",") } }), { sessionId: String(p.session.id) }));
    expect(res.checked).toBe(clean.length);
    expect(res.skipped).toBe(1);
    for (const r of clean) expect((await Submission.findByPk(r.latest.id))!.reviewState).toBe("checked");
    expect((await Submission.findByPk(slip.latest.id))!.reviewState).toBe("to-check");
    expect(await AuditEntry.count({ where: { action: "submission.checked", entityId: String(clean[0].latest.id) } })).toBe(1);
    // after release, what is still unchecked is what the queue shows as not checked
    const after = payloadOf(await call(queuePage, request(`/sessions/${p.session.id}/review`, { cookie: staff }), { sessionId: String(p.session.id) }));
    expect(after.releasedAt).not.toBeNull();
    expect(after.rows.filter((r: { latest: { tab: string } | null }) => r.latest && r.latest.tab !== "checked").map((r: { group: string }) => r.group)).toContain("G3");
  });
});
