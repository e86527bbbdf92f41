// Marking against the real database and job queue: readings made from the reference k at the
// bench score full marks, a unit slip and a wrong reported k lose their parts, a worker stopped
// mid-queue and started again marks every submission once, a failure is recorded for staff,
// exclusions and overrides are audited, students see only their own group and no reference value
// before release, and release e-mails each group.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { loader as apiSubmission } from "~/routes/api/submission";
import { loader as apiOriginal } from "~/routes/api/submission-original";
import { loader as feedbackPage } from "~/routes/submissions/submission";
import { loader as uploadPage } from "~/routes/groups/submissions";
import { loader as queuePage, action as queueAction } from "~/routes/sessions/review";
import { loader as reviewPage, action as reviewAction } from "~/routes/sessions/review-submission";
import { AuditEntry, sequelize } from "~/.server/db/models.server";
import { Submission } from "~/.server/db/submissions.server";
import { enqueue } from "~/.server/jobs/queue.server";
import { runJobsUntilIdle, startWorker } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { runCsv, simulateRun, type Mistake } from "~/lib/marking/simulate";
import { call, payloadOf, request, statusOf, waitForMail } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";

let p: Practical;
let cookies: string[];
let staff: string;

beforeAll(async () => {
  p = await makePractical("MARK-T", { groups: 3 });
  cookies = await Promise.all(p.students.map((s) => p.cookie(s)));
  staff = await p.cookie(p.instructor);
  await runJobsUntilIdle();
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

async function submitRun(g: number, mistake: Mistake, opts: { reportedK?: number; n?: number; seed?: number; noise?: number } = {}) {
  const bench = p.benches[g];
  const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: opts.n ?? 20, seed: opts.seed ?? 11 + g, mistake, noise: opts.noise });
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[g].id}/submissions`, cookies[g], { bytes: runCsv(run), name: `${mistake}.csv` }, {
    reportedK: String(opts.reportedK ?? run.reportedK), reportedMethod: run.reportedMethod, measured: "concentrationA",
  }), { groupId: String(p.groups[g].id) });
  expect(res.status).toBe(202);
  return ((await res.json()) as { id: number }).id;
}

describe("marking", () => {
  test("readings made from the reference k at the bench's temperature score full marks", async () => {
    const id = await submitRun(0, "none");
    await runJobsUntilIdle();
    const s = (await Submission.findByPk(id))!;
    expect(s.status).toBe("marked");
    expect(s.autoMark).toBe(100);
    expect(s.checks!.kRefAtT).toBeCloseTo(p.kAt(p.benches[0]), 12);
    expect(Math.abs(s.checks!.experiment.deviationPct)).toBeLessThan(5);
    expect(s.markingRuns).toBe(1);
  });

  test("minutes written as seconds: unit slip flagged, the experiment part lost", async () => {
    const id = await submitRun(1, "minutes-as-seconds");
    await runJobsUntilIdle();
    const s = (await Submission.findByPk(id))!;
    expect(s.flags.map((f) => f.code)).toContain("unit-slip");
    expect(s.experimentPart).toBe(0);
    expect(s.analysisPart).toBe(40);
    expect(s.feedback.join(" ")).toMatch(/unit-conversion factor/);
  });

  test("a reported k that is not the group's own line loses the analysis part", async () => {
    const id = await submitRun(2, "none", { reportedK: 0.5 });
    await runJobsUntilIdle();
    const s = (await Submission.findByPk(id))!;
    expect(s.analysisPart).toBe(0);
    expect(s.experimentPart).toBe(60);
    expect(s.autoMark).toBe(60);
  });

  test("readings the marking would refuse are refused at upload (422) with the engine's message in the file's rows", async () => {
    // a negative concentration (row 4 of the file, -3 mmol/L against a 20 mmol/L feed)
    const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[2].id}/submissions`, cookies[2], { bytes: "t / min,CA (mmol/L)\n0,20\n2,15\n4,-3\n6,9\n8,7\n", name: "neg.csv" }, { measured: "concentrationA" }), { groupId: String(p.groups[2].id) });
    expect(res.status).toBe(422);
    const body = (await res.json()) as any;
    expect(body.status).toBe("refused");
    expect(body.errors[0].message).toBe("neg.csv: Row 4 of the file, column B (CA (mmol/L)): a concentration cannot be negative (-3 is below zero by more than reading noise).");
    expect((await Submission.findByPk(body.id))!.status).toBe("refused");
  });

  test("a marking failure is recorded and shown, with its reason, to staff and to the group", async () => {
    // a version stored before the upload checks existed: its readings are only refused by the job
    const id = await submitRun(2, "none");
    await sequelize.query("update submissions set readings = jsonb_set(readings, '{points,2,1}', to_jsonb(-((readings->'points'->0->>1)::float8) / 2)) where id = :id", { replacements: { id } });
    await runJobsUntilIdle();
    const s = (await Submission.findByPk(id))!;
    expect(s.status).toBe("failed");
    expect(s.markingError).toMatch(/^Row 4 of the file, column B \(.*\): a concentration cannot be negative/);
    const queue = payloadOf(await call(queuePage, request(`/sessions/${p.session.id}/review`, { cookie: staff }), { sessionId: String(p.session.id) }));
    const row = queue.rows.find((r: any) => r.groupId === p.groups[2].id);
    expect(row.latest).toMatchObject({ status: "failed", tab: "flagged" });
    expect(row.latest.markingError).toMatch(/cannot be negative/);
    const mine = await ((await call(apiSubmission, request(`/api/submissions/${id}`, { cookie: cookies[2] }), { submissionId: String(id) })) as Response).json();
    expect(mine).toMatchObject({ status: "failed", markingError: expect.stringMatching(/Row 4 of the file.*cannot be negative/) });
    const page = payloadOf(await call(feedbackPage, request(`/submissions/${id}`, { cookie: cookies[2] }), { submissionId: String(id) }));
    expect(page.view.status).toBe("failed");
    // a new, honest version is marked as usual
    const again = await submitRun(2, "none");
    await runJobsUntilIdle();
    expect((await Submission.findByPk(again))!.status).toBe("marked");
  });

  test("a version whose marking job used up its tries is not left waiting: release settles it as failed, with the reason", async () => {
    const id = await submitRun(2, "none");
    await sequelize.query(
      "select graphile_worker.permanently_fail_jobs(array(select j.id from graphile_worker._private_jobs j join graphile_worker._private_tasks t on t.id = j.task_id where t.identifier = 'mark-submission' and (j.payload->>'submissionId')::int = :id), 'worker lost the database')",
      { replacements: { id } },
    );
    const waiting = (await Submission.findByPk(id))!;
    expect(waiting.status).toBe("queued");
    const { settleStoppedMarking } = await import("~/.server/submissions/review.server");
    expect(await settleStoppedMarking(p.session.id)).toBe(1);
    const s = (await Submission.findByPk(id))!;
    expect(s.status).toBe("failed");
    expect(s.markingError).toMatch(/its marking job stopped after its last try \(worker lost the database\)/);
    const mine = await ((await call(apiSubmission, request(`/api/submissions/${id}`, { cookie: cookies[2] }), { submissionId: String(id) })) as Response).json();
    expect(mine).toMatchObject({ status: "failed", markingError: expect.stringMatching(/could not be marked/) });
    // staff mark it again from the review page (audited)
    const params = { sessionId: String(p.session.id), submissionId: String(id) };
    const again = payloadOf(await call(reviewAction, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff, form: { intent: "mark-again" } }), params));
    expect(again.ok).toMatch(/Marked again/);
    expect((await Submission.findByPk(id))!.status).toBe("marked");
    expect(await AuditEntry.count({ where: { action: "submission.marked-again", entityId: String(id) } })).toBe(1);
    // the dead job stays for the job page; take it away so the job-path test below starts clean
    await sequelize.query("delete from graphile_worker._private_jobs j using graphile_worker._private_tasks t where t.id = j.task_id and t.identifier = 'mark-submission' and (j.payload->>'submissionId')::int = :id", { replacements: { id } });
  });
});

describe("the job path", () => {
  test("a worker stopped mid-queue and started again marks every submission once", async () => {
    const ids: number[] = [];
    for (let i = 0; i < 24; i++) ids.push(await submitRun(i % 3, "none", { n: 3000, seed: 100 + i }));
    const worker = await startWorker({ concurrency: 1, pollInterval: 50 });
    for (let i = 0; i < 200; i++) {
      if ((await Submission.count({ where: { id: ids, status: "marked" } })) >= 3) break;
      await new Promise((r) => setTimeout(r, 25));
    }
    await worker.stop();
    const markedAtStop = await Submission.count({ where: { id: ids, status: "marked" } });
    expect(markedAtStop).toBeGreaterThanOrEqual(3);
    expect(markedAtStop).toBeLessThan(ids.length);
    // a job delivered twice (as after a crash between marking and reporting the job done)
    await enqueue("mark-submission", { submissionId: ids[0] });
    await runJobsUntilIdle();
    const all = await Submission.findAll({ where: { id: ids } });
    expect(all.every((s) => s.status === "marked")).toBe(true);
    expect(all.map((s) => s.markingRuns)).toEqual(ids.map(() => 1));
    // No job is left waiting. One the stopped worker held stays locked (graphile-worker frees it
    // after its lock timeout); freeing it now and running it changes nothing: it is not queued.
    const [waiting] = await sequelize.query("select id from graphile_worker.jobs where task_identifier = 'mark-submission' and locked_at is null");
    expect(waiting).toEqual([]);
    const [held] = await sequelize.query("select distinct locked_by from graphile_worker.jobs where locked_by is not null");
    const workers = (held as Array<{ locked_by: string }>).map((r) => r.locked_by);
    if (workers.length) await sequelize.query("select graphile_worker.force_unlock_workers(:workers)", { replacements: { workers: `{${workers.join(",")}}` } });
    await runJobsUntilIdle();
    const again = await Submission.findAll({ where: { id: ids } });
    expect(again.map((s) => s.markingRuns)).toEqual(ids.map(() => 1));
    const [left] = await sequelize.query("select id from graphile_worker.jobs where task_identifier = 'mark-submission'");
    expect(left).toEqual([]);
  }, 60_000);
});

describe("review: exclusions, overrides, comments", () => {
  test("leaving out a reading needs a reason, recomputes the mark and is audited", async () => {
    const id = await submitRun(0, "wild-reading", { seed: 5 });
    await runJobsUntilIdle();
    const before = (await Submission.findByPk(id))!;
    const wildRow = before.readings!.rowNumbers[Math.floor(20 * 0.55)];
    const params = { sessionId: String(p.session.id), submissionId: String(id) };
    const refused = payloadOf(await call(reviewAction, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff, form: { intent: "exclude", row: String(wildRow), reason: " " } }), params));
    expect(refused.error).toMatch(/Give a reason/);
    const ok = payloadOf(await call(reviewAction, request(`/sessions/${p.session.id}/review/${id}`, { cookie: staff, form: { intent: "exclude", row: String(wildRow), reason: "misread scale, see lab book" } }), params));
    expect(ok.ok).toMatch(/left out/);
    const after = (await Submission.findByPk(id))!;
    expect(after.excluded.map((e) => e.row)).toEqual([wildRow]);
    expect((after.fit as any).n).toBe(before.readings!.points.length - 1);
    expect(Math.abs(after.checks!.experiment.deviationPct)).toBeLessThan(Math.abs(before.checks!.experiment.deviationPct));
    const audit = await AuditEntry.findOne({ where: { action: "submission.reading-excluded", entityId: String(id) } });
    expect(audit!.before).toMatchObject({ excluded: [] });
    expect(audit!.after).toMatchObject({ reason: "misread scale, see lab book", excluded: [{ row: wildRow }] });
  });

  test("an override needs a reason and keeps before and after in the audit log; comments and checked state", async () => {
    const id = (await Submission.findOne({ where: { groupId: p.groups[1].id, status: "marked" }, order: [["version", "DESC"]] }))!.id;
    const params = { sessionId: String(p.session.id), submissionId: String(id) };
    const url = `/sessions/${p.session.id}/review/${id}`;
    const noReason = payloadOf(await call(reviewAction, request(url, { cookie: staff, form: { intent: "override", mark: "75", reason: "" } }), params));
    expect(noReason.error).toMatch(/Give a reason/);
    const before = (await Submission.findByPk(id))!.autoMark;
    payloadOf(await call(reviewAction, request(url, { cookie: staff, form: { intent: "override", mark: "75", reason: "units explained in the report" } }), params));
    const s = (await Submission.findByPk(id))!;
    expect([s.overrideMark, s.overrideReason]).toEqual([75, "units explained in the report"]);
    const audit = await AuditEntry.findOne({ where: { action: "submission.mark-overridden", entityId: String(id) } });
    expect(audit!.before).toMatchObject({ mark: before, overrideMark: null });
    expect(audit!.after).toMatchObject({ mark: 75, overrideMark: 75, reason: "units explained in the report" });
    await call(reviewAction, request(url, { cookie: staff, form: { intent: "comment", body: "Good recovery." } }), params);
    await call(reviewAction, request(url, { cookie: staff, form: { intent: "checked" } }), params);
    const page = payloadOf(await call(reviewPage, request(url, { cookie: staff }), params));
    expect(page.comments.map((c: any) => c.body)).toEqual(["Good recovery."]);
    expect(page.tab).toBe("checked");
    expect(page.view.mark).toBe(75);
  });
});

describe("access and release", () => {
  test("a student asking for another group's submission gets 404 through the API and the pages; an outsider 403", async () => {
    const other = (await Submission.findOne({ where: { groupId: p.groups[1].id } }))!;
    const mine = { cookie: cookies[0] };
    expect(statusOf(await call(apiSubmission, request(`/api/submissions/${other.id}`, mine), { submissionId: String(other.id) }))).toBe(404);
    expect(statusOf(await call(apiOriginal, request(`/api/submissions/${other.id}/original`, mine), { submissionId: String(other.id) }))).toBe(404);
    expect(statusOf(await call(feedbackPage, request(`/submissions/${other.id}`, mine), { submissionId: String(other.id) }))).toBe(404);
    expect(statusOf(await call(uploadPage, request(`/groups/${p.groups[1].id}/submissions`, mine), { groupId: String(p.groups[1].id) }))).toBe(404);
    const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[1].id}/submissions`, cookies[0], { bytes: "t,c\n0,1\n1,2\n2,3\n3,4\n", name: "x.csv" }), { groupId: String(p.groups[1].id) });
    expect(res.status).toBe(404);
    expect(statusOf(await call(queuePage, request(`/sessions/${p.session.id}/review`, mine), { sessionId: String(p.session.id) }))).toBe(403);
    const outsider = await makePractical("MARK-O", { groups: 1 });
    const oc = await outsider.cookie(outsider.students[0]);
    expect(statusOf(await call(apiSubmission, request(`/api/submissions/${other.id}`, { cookie: oc }), { submissionId: String(other.id) }))).toBe(403);
    await outsider.course.destroy();
  });

  test("before release a student sees status, version, problems and the preview, never a reference, tolerance or mark", async () => {
    const s = (await Submission.findOne({ where: { groupId: p.groups[1].id, status: "marked" }, order: [["version", "ASC"]] }))!;
    const res: Response = await call(apiSubmission, request(`/api/submissions/${s.id}`, { cookie: cookies[1] }), { submissionId: String(s.id) });
    const body = await res.json();
    expect(body).toMatchObject({ id: s.id, version: s.version, status: "marked", mark: null, feedback: [] });
    expect(body.fit.k).toBeGreaterThan(0);
    const pageData = payloadOf(await call(feedbackPage, request(`/submissions/${s.id}`, { cookie: cookies[1] }), { submissionId: String(s.id) }));
    const upData = payloadOf(await call(uploadPage, request(`/groups/${p.groups[1].id}/submissions`, { cookie: cookies[1] }), { groupId: String(p.groups[1].id) }));
    for (const text of [JSON.stringify(body), JSON.stringify(pageData), JSON.stringify(upData)]) {
      expect(text).not.toMatch(/kAtT|kRefAtT|tolerance|withinTolerance|deviationPct|kRef|EaKJ|unit-slip|"mark":\d/);
      expect(text).not.toContain(String(p.kAt(p.benches[1])));
    }
  });

  test("release e-mails each group through the queue; then the student sees the mark and feedback", async () => {
    const res = payloadOf(await call(queueAction, request(`/sessions/${p.session.id}/review`, { cookie: staff, form: { intent: "release" } }), { sessionId: String(p.session.id) }));
    expect(res).toMatchObject({ released: true, mails: 3 });
    await runJobsUntilIdle();
    const [mail] = await waitForMail(p.students[0].email);
    expect(mail.subject).toContain(`Marks released: ${p.session.title}`);
    const s = (await Submission.findOne({ where: { groupId: p.groups[0].id, status: "marked" }, order: [["version", "ASC"]] }))!;
    const body = await ((await call(apiSubmission, request(`/api/submissions/${s.id}`, { cookie: cookies[0] }), { submissionId: String(s.id) })) as Response).json();
    expect(body.mark).toBe(100);
    expect(body.feedback.length).toBeGreaterThan(0);
    expect(JSON.stringify(body)).not.toMatch(/kAtT|kRefAtT|tolerance/); // the instructor did not choose to show it
    const audit = await AuditEntry.findOne({ where: { action: "session.marks-released", entityId: String(p.session.id) } });
    expect(audit!.after).toMatchObject({ mails: 3, showsReference: false });
  });
});
