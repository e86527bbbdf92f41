// Released marks sent to a learning platform through the LTI Assignment and Grade Services, against
// the local fake platform (scripts/lib/fake-platform.ts), which checks what it receives the way
// the open standard asks (1EdTech AGS 2.0, 3.2 line items and 3.4 scores; Security Framework 1.0,
// 4.1 client-credentials token with a JWT client assertion, checked with jose against the tool's
// published key set; from memory of the standards' texts). The marks themselves are the
// gradebook's (tested in gradebook.test.ts); here: each is posted once, an outage is retried,
// a changed mark is re-sent once, a given-up score is shown and can be sent again.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { QueryTypes } from "sequelize";
import { startFakePlatform, type FakePlatform } from "../../scripts/lib/fake-platform";
import { loader as ltiLogin } from "~/routes/lti/login";
import { action as ltiLaunch } from "~/routes/lti/launch";
import { loader as jwksRoute } from "~/routes/lti/jwks";
import { action as adminLti } from "~/routes/admin/lti";
import { action as reviewAction } from "~/routes/sessions/review";
import { action as marksAction, loader as marksPage } from "~/routes/sessions/platform-marks";
import { sequelize } from "~/.server/db/models.server";
import { GroupMember } from "~/.server/db/groups.server";
import { LtiAccount, LtiContext, LtiPlatform } from "~/.server/db/lti.server";
import { Submission } from "~/.server/db/submissions.server";
import { overrideMark } from "~/.server/submissions/review.server";
import { pendingJobs, runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { SEND_ATTEMPTS } from "~/.server/lti/grades.server";
import { call, payloadOf, request, signInAs, statusOf } from "./helpers";
import { makePractical, type Practical } from "./practical-fixture";
import { testEnv, TEST_LTI_PORT } from "../setup/test-env";

const APP = testEnv.APP_URL;
const CLIENT = { clientId: "ratebook-grades-test", deploymentId: "dep-grades-1" };
const CONTEXT = "ctx-kin-305";
let platform: FakePlatform;
let p: Practical;
let staff: string;
let platformId: number;
const subs: Submission[] = [];

function cookiesOf(res: Response): string {
  return res.headers.getSetCookie().map((c) => c.split(";")[0]).filter((c) => !c.endsWith("=")).join("; ");
}

/** A whole launch of `sub` into the platform course, through the fake platform's own answer. */
async function launch(sub: string): Promise<Response> {
  const q = new URLSearchParams({ iss: platform.issuer, login_hint: sub, lti_message_hint: CONTEXT, target_link_uri: `${APP}/lti/launch`, client_id: CLIENT.clientId, lti_deployment_id: CLIENT.deploymentId });
  const login: Response = await call(ltiLogin, request(`/lti/login?${q}`));
  const html = await (await fetch(login.headers.get("Location")!)).text();
  const form = { id_token: html.match(/name="id_token" value="([^"]+)"/)![1], state: html.match(/name="state" value="([^"]+)"/)![1] };
  return call(ltiLaunch, request("/lti/launch", { form, cookie: cookiesOf(login) }));
}

/** Lets the queue's backoff pass (the retry is due now) and runs the jobs. */
async function retryNow() {
  await sequelize.query("update graphile_worker._private_jobs set run_at = now() where task_id = (select id from graphile_worker._private_tasks where identifier = 'lti-send-scores')");
  await runJobsUntilIdle();
}

async function page() {
  return payloadOf(await call(marksPage, request(`/sessions/${p.session.id}/platform-marks`, { cookie: staff }), { sessionId: String(p.session.id) })) as { rows: Array<{ email: string; mark: number; sentMark: number | null; state: string; attempts: number; lastError: string | null }> };
}

const scoresOf = (sub: string) => platform.scores.filter((s) => s.userId === sub).map((s) => s.scoreGiven);
const sentAudits = async () => (await sequelize.query<{ n: number }>("select count(*)::int as n from audit_log where action = 'lti-score.sent' and entity_id = :id", { type: QueryTypes.SELECT, replacements: { id: String(p.session.id) } }))[0].n;

beforeAll(async () => {
  platform = await startFakePlatform({ port: TEST_LTI_PORT, ...CLIENT, toolLoginUrl: `${APP}/lti/login`, toolLaunchUrl: `${APP}/lti/launch`, toolKeySet: async () => (await jwksRoute()).json() });
  const admin = await signInAs("admin@demo.ratebook.invalid", "demo-admin-pass");
  const res = await call(adminLti, request("/admin/lti", { cookie: admin, form: { intent: "register", name: "Fake Platform for grades (invented)", issuer: platform.issuer, clientId: CLIENT.clientId, loginUrl: platform.loginUrl, keySetUrl: platform.keySetUrl, tokenUrl: platform.tokenUrl, deploymentIds: CLIENT.deploymentId } }));
  expect(statusOf(res)).toBe(200);
  platformId = (await LtiPlatform.findOne({ where: { issuer: platform.issuer, clientId: CLIENT.clientId } }))!.id;

  // The Ratebook course is already linked to the platform course (as an instructor's launch links it).
  p = await makePractical("LTI-GRADES", { groups: 3 });
  staff = await p.cookie(p.instructor);
  await LtiContext.create({ platformId, contextId: CONTEXT, courseId: p.course.id, title: "Advanced kinetics laboratory (invented platform course)" });
  // Two platform students open Ratebook from the platform (the launch records where scores go) and join groups 1 and 2.
  for (const [sub, g] of [["lp-2001", 0], ["lp-2002", 1]] as const) {
    expect((await launch(sub)).status).toBe(303);
    const account = await LtiAccount.findOne({ where: { platformId, subject: sub } });
    await GroupMember.create({ groupId: p.groups[g].id, courseId: p.course.id, userId: account!.userId });
  }
  const base = { sessionId: p.session.id, submittedAt: new Date(), status: "marked", measured: "concentrationA", timeUnit: "min", concentrationUnit: "mol/L", readings: null, reportedK: null, reportedMethod: null, timeColumn: null, valueColumn: null, submittedById: null };
  // G1 marked 80, G2 marked 55, G3 uploaded nothing (no score is sent for nothing).
  subs.push(await Submission.create({ ...base, groupId: p.groups[0].id, benchId: p.benches[0].id, version: 1, autoMark: 80 } as never));
  subs.push(await Submission.create({ ...base, groupId: p.groups[1].id, benchId: p.benches[1].id, version: 1, autoMark: 55 } as never));
});

afterAll(async () => {
  await p?.course.destroy();
  await LtiPlatform.destroy({ where: { id: platformId } });
  await platform?.close();
});

describe("grades sent to the learning platform (AGS)", () => {
  test("the launch recorded the platform course's line item container and scopes", async () => {
    const link = await LtiContext.findOne({ where: { platformId, contextId: CONTEXT } });
    expect(link!.lineitemsUrl).toBe(`${platform.issuer}/contexts/${CONTEXT}/lineitems`);
    expect(link!.agsScopes).toEqual(["https://purl.imsglobal.org/spec/lti-ags/scope/lineitem", "https://purl.imsglobal.org/spec/lti-ags/scope/score"]);
    const keys = (await (await jwksRoute()).json()) as { keys: Array<Record<string, unknown>> };
    expect(keys.keys[0]).toMatchObject({ kty: "RSA", alg: "RS256", use: "sig" });
    expect(keys.keys[0]).not.toHaveProperty("d"); // never the private part
  });

  test("release answers at once; a platform that is down leaves the scores waiting, and the retry sends each once", async () => {
    platform.failNext(1);
    const res = await call(reviewAction, request(`/sessions/${p.session.id}/review`, { cookie: staff, form: { intent: "release" } }), { sessionId: String(p.session.id) });
    expect(payloadOf(res)).toMatchObject({ released: true });
    expect(platform.scores).toHaveLength(0); // nothing is sent inside the request
    // Only the two students the platform knows get a score (the fixture's own students have no platform account).
    expect((await page()).rows.map((r) => [r.mark, r.state])).toEqual(expect.arrayContaining([[80, "waiting"], [55, "waiting"]]));
    expect((await page()).rows).toHaveLength(2);

    await runJobsUntilIdle(); // first attempt: the token request meets the outage
    expect(platform.scores).toHaveLength(0);
    const waiting = (await page()).rows;
    expect(waiting.every((r) => r.state === "waiting" && r.attempts === 1 && /503/.test(r.lastError ?? ""))).toBe(true);

    await retryNow();
    expect(platform.refusals).toEqual([]);
    expect(platform.lineItems).toHaveLength(1);
    expect(platform.lineItems[0]).toMatchObject({ contextId: CONTEXT, label: p.session.title, resourceId: `ratebook-practical-${p.session.id}`, scoreMaximum: 100 });
    expect(scoresOf("lp-2001")).toEqual([80]);
    expect(scoresOf("lp-2002")).toEqual([55]);
    expect(platform.scores.every((s) => s.scoreMaximum === 100 && s.activityProgress === "Completed" && s.gradingProgress === "FullyGraded" && s.lineItemId === platform.lineItems[0].id)).toBe(true);
    expect((await page()).rows.map((r) => [r.sentMark, r.state])).toEqual(expect.arrayContaining([[80, "sent"], [55, "sent"]]));
    expect(await sentAudits()).toBe(2);

    // Releasing again, or running the queue again, posts nothing more.
    await call(reviewAction, request(`/sessions/${p.session.id}/review`, { cookie: staff, form: { intent: "release" } }), { sessionId: String(p.session.id) });
    await retryNow();
    expect(platform.scores).toHaveLength(2);
  });

  test("a mark changed after it was sent is sent again, once, to the same line item", async () => {
    await overrideMark(p.instructor, subs[1], 62, "Rate constant re-read from the notebook");
    await runJobsUntilIdle();
    await retryNow();
    expect(scoresOf("lp-2002")).toEqual([55, 62]);
    expect(scoresOf("lp-2001")).toEqual([80]);
    expect(platform.lineItems).toHaveLength(1);
    expect(await sentAudits()).toBe(3);
  });

  test("a platform down for every attempt: the scores show as failed with its answer, and the instructor sends them again", async () => {
    platform.failNext(1000);
    await overrideMark(p.instructor, subs[0], 74, "Late penalty applied by hand");
    await runJobsUntilIdle();
    for (let i = 1; i < SEND_ATTEMPTS; i++) await retryNow();
    const row = (await page()).rows.find((r) => r.mark === 74)!;
    expect(row).toMatchObject({ state: "failed", sentMark: 80, attempts: SEND_ATTEMPTS });
    expect(row.lastError).toMatch(/answered 503/);
    expect(scoresOf("lp-2001")).toEqual([80]);

    platform.failNext(0);
    const res = await call(marksAction, request(`/sessions/${p.session.id}/platform-marks`, { cookie: staff, form: { intent: "resend" } }), { sessionId: String(p.session.id) });
    expect(payloadOf(res)).toEqual({ resent: 1 });
    await runJobsUntilIdle();
    expect(scoresOf("lp-2001")).toEqual([80, 74]);
    expect((await page()).rows.every((r) => r.state === "sent")).toBe(true);
    expect(platform.refusals).toEqual([]);
    // the given-up job was replaced, and the new one is done: nothing is left on the queue
    expect((await pendingJobs()).filter((j) => j.task === "lti-send-scores")).toEqual([]);
  });

  test("a demonstrator or student cannot see or resend the platform's scores", async () => {
    const student = await p.cookie(p.students[0]);
    const res = await call(marksPage, request(`/sessions/${p.session.id}/platform-marks`, { cookie: student }), { sessionId: String(p.session.id) });
    expect(statusOf(res)).toBe(403);
  });
});
