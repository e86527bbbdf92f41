// Class results and the live dashboard against the real database: a small invented practical whose
// groups upload runs made from the reference k at their bench (closed forms plus seeded noise),
// marked by the real job; the pooled Arrhenius fit checked against an independent weighted
// regression; leaving a bench out (reason required, audited, fit changes, put back); the live
// figures as uploads arrive; and who may see what.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { MultivariateLinearRegression } from "ml-regression";
import jStat from "jstat";
import { action as upload } from "~/routes/api/group-submissions";
import { loader as pageLoader, action as pageAction } from "~/routes/sessions/class-results";
import { loader as apiLoader } from "~/routes/api/class-results";
import { loader as liveLoader } from "~/routes/dashboard-live";
import { loader as dashboardLoader } from "~/routes/dashboard";
import { AuditEntry, CourseMembership, User } from "~/.server/db/models.server";
import { Submission } from "~/.server/db/submissions.server";
import { ClassFitExclusion } from "~/.server/db/class-results.server";
import { hashPassword } from "~/.server/passwords.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { runCsv, simulateRun, type Mistake } from "~/lib/marking/simulate";
import type { LiveFigures } from "~/lib/dashboard/live-figures";
import { call, payloadOf, request, signInAs, statusOf } from "./helpers";
import { makePractical, PASSWORD, REFERENCE, uploadRequest, type Practical } from "./practical-fixture";

const R = 8.314462618; // J/(mol K), CODATA (exact in the 2019 SI)

let p: Practical;
let other: Practical;
let cookies: string[];
let staff: string;
let demonstrator: string;
let otherStaff: string;

beforeAll(async () => {
  p = await makePractical("CLASS-T", { groups: 5 });
  other = await makePractical("CLASS-O", { groups: 1 });
  cookies = await Promise.all(p.students.map((s) => p.cookie(s)));
  staff = await p.cookie(p.instructor);
  otherStaff = await other.cookie(other.instructor);
  const helper = await User.create({ email: "class-t-demonstrator@test.ratebook.invalid", displayName: "Demonstrator CLASS-T", role: "member", passwordHash: await hashPassword(PASSWORD) });
  await CourseMembership.create({ courseId: p.course.id, userId: helper.id, role: "demonstrator" });
  demonstrator = await signInAs(helper.email, PASSWORD);
  await runJobsUntilIdle();
});

afterAll(async () => {
  await p.course.destroy();
  await other.course.destroy();
  await User.destroy({ where: { email: "class-t-demonstrator@test.ratebook.invalid" } });
  await closeSequelize();
});

async function submitRun(g: number, mistake: Mistake = "none", seed = 31 + g) {
  const bench = p.benches[g];
  const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: 20, seed, mistake });
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[g].id}/submissions`, cookies[g], { bytes: runCsv(run), name: `${mistake}.csv` }, {
    reportedK: String(run.reportedK), reportedMethod: run.reportedMethod, measured: "concentrationA",
  }), { groupId: String(p.groups[g].id) });
  expect(res.status).toBe(202);
  return ((await res.json()) as { id: number }).id;
}

const page = async (cookie = staff) => {
  const res = await call(pageLoader, request(`/sessions/${p.session.id}/class-results`, { cookie }), { sessionId: String(p.session.id) });
  return { status: statusOf(res), body: payloadOf(res) };
};
const post = (form: Record<string, string>, cookie = staff) =>
  call(pageAction, request(`/sessions/${p.session.id}/class-results`, { cookie, form }), { sessionId: String(p.session.id) });
const live = async (cookie = staff) => {
  const res: Response = await call(liveLoader, request("/dashboard/live", { cookie }));
  return { status: res.status, body: (await res.json()) as LiveFigures & { error?: string } };
};
const mine = (figures: LiveFigures) => figures.practicals.find((x) => x.id === p.session.id);

/**
 * The pooled fit worked independently from what the database holds: each group's latest marked
 * k and its standard error (read here with the model, not the service's SQL), then weighted
 * least squares of ln k on 1/T with w = (k / SE)^2, as ordinary least squares on the rows scaled
 * by sqrt(w) through the origin (standard result; Draper and Smith, Applied Regression Analysis,
 * 3rd ed., 9.2; from memory), solved by ml-regression's MultivariateLinearRegression. The 95 %
 * interval is Ea ± t(0.975, n - 2) SE with t from jStat.
 */
async function independentFit(leaveOut: number[] = []) {
  const subs = await Submission.findAll({ where: { sessionId: p.session.id, status: "marked" }, order: [["version", "DESC"]] });
  const rows: Array<{ T: number; k: number; se: number }> = [];
  for (const [i, bench] of p.benches.entries()) {
    if (leaveOut.includes(i)) continue;
    const latest = subs.find((s) => s.groupId === p.groups[i].id);
    if (!latest) continue;
    const fit = latest.fit as { k: number; kStdErr: number };
    rows.push({ T: bench.temperatureC + 273.15, k: fit.k, se: fit.kStdErr });
  }
  const x = rows.map((r) => [r.k / r.se, r.k / r.se / r.T]);
  const y = rows.map((r) => [(r.k / r.se) * Math.log(r.k)]);
  const reg = new MultivariateLinearRegression(x, y, { intercept: false, statistics: true });
  const [lnA, slope] = reg.weights.map((w: number[]) => w[0]);
  const EaKJ = (-R * slope) / 1000;
  const halfWidth = ((jStat as unknown as { studentt: { inv: (p: number, dof: number) => number } }).studentt.inv(0.975, rows.length - 2) * R * reg.stdErrors[1]) / 1000;
  return { n: rows.length, EaKJ, lnA, EaKJCI95: [EaKJ - halfWidth, EaKJ + halfWidth] };
}

describe("class results", () => {
  test("fewer than 3 marked benches: no fit, said plainly; the reference A is kRef exp(Ea/(R Tref))", async () => {
    await submitRun(0);
    await submitRun(1);
    await runJobsUntilIdle();
    const { status, body } = await page();
    expect(status).toBe(200);
    expect(body.fit).toBeNull();
    expect(body.noFit).toMatch(/only 2 benches have a marked k.*at least 3/);
    expect(body.benches.map((b: { state: string }) => b.state)).toEqual(["in-fit", "in-fit", "no-upload", "no-upload", "no-upload"]);
    // Arrhenius equation solved for A at the reference temperature (textbook form, from memory)
    expect(body.reference.A).toBeCloseTo(REFERENCE.kRef * Math.exp((REFERENCE.EaKJ * 1000) / (R * (REFERENCE.TrefC + 273.15))), 6);
  });

  test("the pooled fit over four marked benches matches an independent weighted regression", async () => {
    await submitRun(2);
    await submitRun(3);
    await runJobsUntilIdle();
    const { body } = await page();
    const ref = await independentFit();
    expect(ref.n).toBe(4);
    expect(body.fit.n).toBe(4);
    expect(body.fit.weighting).toBe("k-uncertainty");
    expect(body.fit.EaKJ).toBeCloseTo(ref.EaKJ, 6);
    expect(body.fit.lnA).toBeCloseTo(ref.lnA, 6);
    expect(body.fit.EaKJCI95[0]).toBeCloseTo(ref.EaKJCI95[0], 5);
    expect(body.fit.EaKJCI95[1]).toBeCloseTo(ref.EaKJCI95[1], 5);
    // the runs were made from Ea = 50 kJ/mol: the class interval holds it
    expect(body.fit.EaKJCI95[0]).toBeLessThan(REFERENCE.EaKJ);
    expect(body.fit.EaKJCI95[1]).toBeGreaterThan(REFERENCE.EaKJ);
    // spread per bench: deviation of the stored marking k from k ref at T, in percent
    for (const b of body.benches.filter((x: { state: string }) => x.state === "in-fit")) {
      const bench = p.benches.find((x) => x.id === b.benchId)!;
      expect(b.kRefAtT).toBeCloseTo(p.kAt(bench), 12);
      expect(b.deviationPct).toBeCloseTo(((b.k - p.kAt(bench)) / p.kAt(bench)) * 100, 9);
      expect(Math.abs(b.deviationPct)).toBeLessThan(10);
    }
    expect(body.plot.inFit).toHaveLength(4);
    expect(body.plot.fitted).toHaveLength(2);
    expect(body.plot.reference).toHaveLength(2);
  });

  test("leaving a bench out needs a reason and an instructor; it is audited, changes the fit, and can be put back", async () => {
    const before = (await page()).body;
    const benchId = String(p.benches[3].id);
    const auditsBefore = await AuditEntry.count({ where: { action: "class-fit.bench-excluded", entityId: String(p.session.id) } });

    const noReason = await post({ intent: "exclude", benchId, reason: "   " });
    expect(statusOf(noReason)).toBe(400);
    expect(payloadOf(noReason).result.error.reason[0]).toMatch(/Give a reason/);
    const tooLong = await post({ intent: "exclude", benchId, reason: "x".repeat(501) });
    expect(statusOf(tooLong)).toBe(400);
    expect(payloadOf(tooLong).result.error.reason[0]).toMatch(/500 characters/);
    const noBench = await post({ intent: "exclude", benchId: "", reason: "no bench named" });
    expect(statusOf(noBench)).toBe(400);
    expect(payloadOf(noBench).benchError).toMatch(/Choose the bench/);
    const foreignBench = await post({ intent: "exclude", benchId: String(other.benches[0].id), reason: "another course's bench" });
    expect(statusOf(foreignBench)).toBe(404);
    expect(statusOf(await post({ intent: "exclude", benchId, reason: "thermostat drifted (invented)" }, demonstrator))).toBe(403);
    expect(await ClassFitExclusion.count({ where: { sessionId: p.session.id } })).toBe(0);
    expect(await AuditEntry.count({ where: { action: "class-fit.bench-excluded", entityId: String(p.session.id) } })).toBe(auditsBefore);

    const done = await post({ intent: "exclude", benchId, reason: "  thermostat drifted (invented)  " });
    expect(statusOf(done)).toBe(200);
    expect(payloadOf(done).message).toMatch(/left out/);
    expect(statusOf(await post({ intent: "exclude", benchId, reason: "again" }))).toBe(409);
    const stored = await ClassFitExclusion.findAll({ where: { sessionId: p.session.id } });
    expect(stored.map((e) => [e.benchId, e.reason, e.excludedById])).toEqual([[p.benches[3].id, "thermostat drifted (invented)", p.instructor.id]]);
    const audit = await AuditEntry.findOne({ where: { action: "class-fit.bench-excluded", entityId: String(p.session.id) }, order: [["id", "DESC"]] });
    expect(audit!.actorId).toBe(p.instructor.id);
    expect(audit!.after).toMatchObject({ bench: p.benches[3].label, inFit: false, reason: "thermostat drifted (invented)" });

    const without = (await page()).body;
    const ref = await independentFit([3]);
    expect(without.fit.n).toBe(3);
    expect(without.fit.EaKJ).toBeCloseTo(ref.EaKJ, 6);
    expect(without.fit.EaKJ).not.toBeCloseTo(before.fit.EaKJ, 3);
    expect(without.plot.excluded).toHaveLength(1);
    const shown = without.benches.find((b: { benchId: number }) => b.benchId === p.benches[3].id);
    expect(shown.state).toBe("excluded");
    expect(shown.exclusion).toMatchObject({ reason: "thermostat drifted (invented)", by: p.instructor.displayName });
    // a demonstrator reads the exclusion but may not change it
    const asHelper = await page(demonstrator);
    expect(asHelper.status).toBe(200);
    expect(asHelper.body.canChange).toBe(false);
    expect(asHelper.body.counts.excluded).toBe(1);
    expect(statusOf(await post({ intent: "include", benchId }, demonstrator))).toBe(403);

    const back = await post({ intent: "include", benchId });
    expect(statusOf(back)).toBe(200);
    expect(statusOf(await post({ intent: "include", benchId }))).toBe(409);
    expect(await ClassFitExclusion.count({ where: { sessionId: p.session.id } })).toBe(0);
    const putBack = await AuditEntry.findOne({ where: { action: "class-fit.bench-included", entityId: String(p.session.id) }, order: [["id", "DESC"]] });
    expect(putBack!.before).toMatchObject({ bench: p.benches[3].label, inFit: false, reason: "thermostat drifted (invented)" });
    const restored = (await page()).body;
    expect(restored.fit.n).toBe(4);
    expect(restored.fit.EaKJ).toBeCloseTo(before.fit.EaKJ, 9);
  });

  test("who may see it: staff of the course; students and other courses never; unknown ids 404", async () => {
    expect((await page(cookies[0])).status).toBe(403);
    expect((await page(otherStaff)).status).toBe(403);
    const unknown = await call(pageLoader, request("/sessions/99999999/class-results", { cookie: staff }), { sessionId: "99999999" });
    expect(statusOf(unknown)).toBe(404);
    expect(statusOf(await post({ intent: "include", benchId: String(p.benches[0].id) }, cookies[0]))).toBe(403);

    const api = (cookie?: string, id = String(p.session.id)) => call(apiLoader, request(`/api/sessions/${id}/class-results`, { cookie }), { sessionId: id }) as Promise<Response>;
    const ok = await api(staff);
    expect(ok.status).toBe(200);
    const json = await ok.json();
    expect(json.fit.n).toBe(4);
    expect(json.reference.EaKJ).toBe(REFERENCE.EaKJ);
    expect((await api(cookies[0])).status).toBe(403);
    expect((await api(otherStaff)).status).toBe(403);
    expect((await api(undefined)).status).toBe(401);
    expect((await api(staff, "abc")).status).toBe(404);
  });
});

describe("live dashboard figures", () => {
  test("a new upload changes the figures: received, then being marked, then marked or flagged", async () => {
    const start = mine((await live()).body)!;
    expect(start).toMatchObject({ groups: 5, uploaded: 4, versions: 4, beingMarked: 0, marked: 4 });
    // group 5 uploads minutes written as seconds: a unit slip, flagged once marked
    await submitRun(4, "minutes-as-seconds");
    const queued = mine((await live()).body)!;
    expect(queued).toMatchObject({ uploaded: 5, versions: 5, beingMarked: 1, marked: 4 });
    await runJobsUntilIdle();
    const marked = mine((await live()).body)!;
    expect(marked).toMatchObject({ uploaded: 5, versions: 5, beingMarked: 0, marked: 5 });
    expect(marked.flagged).toBe(start.flagged + 1);
    // a second version of group 1 counts as a version, not as another group
    await submitRun(0, "none", 77);
    await runJobsUntilIdle();
    expect(mine((await live()).body)).toMatchObject({ uploaded: 5, versions: 6, marked: 5 });
    // the dashboard page carries the same figures in its first render
    const dash = payloadOf(await call(dashboardLoader, request("/dashboard", { cookie: staff })));
    expect(dash.live.practicals.find((x: { id: number }) => x.id === p.session.id)).toMatchObject({ versions: 6, marked: 5 });
  });

  test("staff see only their own courses' open practicals; students get no figures and no polling", async () => {
    const demo = await live(demonstrator);
    expect(demo.status).toBe(200);
    expect(mine(demo.body)).toBeDefined();
    const foreign = await live(otherStaff);
    expect(foreign.status).toBe(200);
    expect(foreign.body.practicals.map((x) => x.id)).toContain(other.session.id);
    expect(mine(foreign.body)).toBeUndefined();
    expect((await live(cookies[0])).status).toBe(403);
    const signedOut: Response = await call(liveLoader, request("/dashboard/live"));
    expect(signedOut.status).toBe(401);
    const studentDash = payloadOf(await call(dashboardLoader, request("/dashboard", { cookie: cookies[0] })));
    expect(studentDash.live).toBeNull();
  });

  test("a closed practical (or a draft) is not open for uploads", async () => {
    await p.session.update({ status: "closed" });
    expect(mine((await live()).body)).toBeUndefined();
    await p.session.update({ status: "draft" });
    expect(mine((await live()).body)).toBeUndefined();
    await p.session.update({ status: "notified" });
    expect(mine((await live()).body)).toBeDefined();
  });
});
