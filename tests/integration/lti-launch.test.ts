// LTI 1.3 launches against a local fake learning platform (scripts/lib/fake-platform.ts: jose-signed
// launches of invented courses and people): the platform registered by an admin, a launch that
// makes the course and the membership, and each kind of bad launch refused with a page saying why.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { startFakePlatform, LIS_ROLES, LTI, type FakePlatform } from "../../scripts/lib/fake-platform";
import { loader as ltiLogin } from "~/routes/lti/login";
import { action as ltiLaunch } from "~/routes/lti/launch";
import { loader as problemPage } from "~/routes/lti/problem";
import { action as adminLti } from "~/routes/admin/lti";
import { currentUser } from "~/.server/guards.server";
import { Course, CourseMembership, User } from "~/.server/db/models.server";
import { LtiContext } from "~/.server/db/lti.server";
import { call, payloadOf, request, signInAs, statusOf } from "./helpers";
import { testEnv, TEST_LTI, TEST_LTI_PORT } from "../setup/test-env";

let platform: FakePlatform;
const APP = testEnv.APP_URL;

function cookiesOf(res: Response): string {
  return res.headers.getSetCookie().map((c) => c.split(";")[0]).filter((c) => !c.endsWith("=")).join("; ");
}

/** The platform's login initiation; returns the authentication request Ratebook answered with and the state cookie. */
async function initiate(personSub: string, courseId: string, extra: Record<string, string> = {}) {
  const q = new URLSearchParams({ iss: platform.issuer, login_hint: personSub, lti_message_hint: courseId, target_link_uri: `${APP}/lti/launch`, client_id: TEST_LTI.clientId, lti_deployment_id: TEST_LTI.deploymentId, ...extra });
  const res: Response = await call(ltiLogin, request(`/lti/login?${q}`));
  return { res, auth: res.status === 302 ? new URL(res.headers.get("Location")!) : null, cookie: cookiesOf(res) };
}

async function post(idToken: string, state: string, cookie: string): Promise<Response> {
  return call(ltiLaunch, request("/lti/launch", { form: { id_token: idToken, state }, cookie }));
}

/** What the refusal page says for a refused launch or login. */
async function refusal(res: Response) {
  expect(res.status).toBe(303);
  expect(res.headers.get("Location")).toBe("/lti/problem");
  const page = await call(problemPage, request("/lti/problem", { cookie: cookiesOf(res) }));
  return { status: statusOf(page), ...payloadOf(page) } as { status: number; kind: string; message: string };
}

/** A whole launch through the fake platform's own authentication answer. */
async function launch(personSub: string, courseId: string) {
  const { auth, cookie } = await initiate(personSub, courseId);
  const html = await (await fetch(auth!)).text();
  const idToken = html.match(/name="id_token" value="([^"]+)"/)![1];
  const state = html.match(/name="state" value="([^"]+)"/)![1];
  return { res: await post(idToken, state, cookie), idToken, state, cookie };
}

/** A login whose launch the test signs itself (to change one thing at a time). */
async function forged(change: (claims: Record<string, unknown>) => void, opts: Parameters<FakePlatform["sign"]>[1] = {}, personSub = "lp-2001") {
  const { auth, cookie } = await initiate(personSub, "ctx-kin-201");
  const person = platform.people.find((p) => p.sub === personSub)!;
  const claims = platform.launchClaims(person, platform.courses[0], auth!.searchParams.get("nonce")!) as Record<string, unknown>;
  change(claims);
  return refusal(await post(await platform.sign(claims, opts), auth!.searchParams.get("state")!, cookie));
}

beforeAll(async () => {
  platform = await startFakePlatform({ port: TEST_LTI_PORT, clientId: TEST_LTI.clientId, deploymentId: TEST_LTI.deploymentId, toolLoginUrl: `${APP}/lti/login`, toolLaunchUrl: `${APP}/lti/launch` });
  const admin = await signInAs("admin@demo.ratebook.invalid", "demo-admin-pass");
  const bad = await call(adminLti, request("/admin/lti", { cookie: admin, form: { intent: "register", name: "", issuer: "http://platform.example.org", clientId: "x", loginUrl: "", keySetUrl: "", deploymentIds: "" } }));
  expect(statusOf(bad)).toBe(400);
  expect(payloadOf(bad).errors).toMatchObject({ name: expect.any(String), issuer: expect.stringMatching(/must start with https/), loginUrl: expect.any(String), keySetUrl: expect.any(String), deploymentIds: expect.any(String) });
  const res = await call(adminLti, request("/admin/lti", { cookie: admin, form: { intent: "register", name: "Fake Platform (invented)", issuer: platform.issuer, clientId: TEST_LTI.clientId, loginUrl: platform.loginUrl, keySetUrl: platform.keySetUrl, tokenUrl: "", deploymentIds: TEST_LTI.deploymentId } }));
  expect(statusOf(res)).toBe(200);
});

afterAll(async () => {
  await platform?.close();
});

describe("LTI 1.3 launch", () => {
  test("the login initiation answers with the platform's authentication request (state, nonce, form_post)", async () => {
    const { res, auth } = await initiate("lp-1001", "ctx-kin-201");
    expect(res.status).toBe(302);
    expect(auth!.origin + auth!.pathname).toBe(platform.loginUrl);
    expect(Object.fromEntries(auth!.searchParams)).toMatchObject({ scope: "openid", response_type: "id_token", response_mode: "form_post", prompt: "none", client_id: TEST_LTI.clientId, redirect_uri: `${APP}/lti/launch`, login_hint: "lp-1001", lti_message_hint: "ctx-kin-201" });
    expect(auth!.searchParams.get("state")!.length).toBeGreaterThan(30);
    expect(auth!.searchParams.get("nonce")!.length).toBeGreaterThan(30);
  });

  test("a learner before the course is linked is refused; the instructor's launch makes the course; then the learner gets a membership", async () => {
    const early = await refusal((await launch("lp-2002", "ctx-kin-305")).res);
    expect(early.kind).toBe("course-not-linked");
    expect(early.message).toMatch(/KIN-LTI-2 on Fake Platform \(invented\) is not linked to a Ratebook course yet/);

    const teacher = await launch("lp-1001", "ctx-kin-201");
    expect(teacher.res.status).toBe(303);
    const course = await Course.findOne({ where: { code: "KIN-LTI" } });
    expect(course?.title).toBe("Rate laws laboratory (invented platform course)");
    expect(teacher.res.headers.get("Location")).toBe(`/courses/${course!.id}`);
    const instructor = await currentUser(request("/dashboard", { cookie: cookiesOf(teacher.res) }));
    expect(instructor?.email).toBe("i.falk@fake-platform.invalid");
    expect((await CourseMembership.findOne({ where: { courseId: course!.id, userId: instructor!.id } }))?.role).toBe("instructor");

    const student = await launch("lp-2001", "ctx-kin-201");
    expect(student.res.status).toBe(303);
    const user = await User.findOne({ where: { email: "t.brandt@fake-platform.invalid" } });
    expect(user?.passwordHash).toBeNull();
    expect((await CourseMembership.findOne({ where: { courseId: course!.id, userId: user!.id } }))?.role).toBe("student");
    const ta = await launch("lp-1002", "ctx-kin-201");
    expect(ta.res.status).toBe(303);
    const taUser = await User.findOne({ where: { email: "j.marsh@fake-platform.invalid" } });
    expect((await CourseMembership.findOne({ where: { courseId: course!.id, userId: taUser!.id } }))?.role).toBe("demonstrator");
    // A second launch reuses the account, the course and the membership.
    expect((await launch("lp-2001", "ctx-kin-201")).res.status).toBe(303);
    expect(await User.count({ where: { email: "t.brandt@fake-platform.invalid" } })).toBe(1);
    expect(await LtiContext.count({ where: { contextId: "ctx-kin-201" } })).toBe(1);
    expect(await CourseMembership.count({ where: { courseId: course!.id } })).toBe(3);
  });

  test("a replayed launch is refused", async () => {
    const first = await launch("lp-2001", "ctx-kin-201");
    expect(first.res.status).toBe(303);
    const again = await refusal(await post(first.idToken, first.state, first.cookie));
    expect(again.kind).toBe("replayed");
    expect(again.message).toMatch(/already used once/);
  });

  test("a launch posted without this browser's state is refused", async () => {
    const { auth } = await initiate("lp-2001", "ctx-kin-201");
    const html = await (await fetch(auth!)).text();
    const idToken = html.match(/name="id_token" value="([^"]+)"/)![1];
    const r = await refusal(await post(idToken, auth!.searchParams.get("state")!, ""));
    expect(r.kind).toBe("no-login");
  });

  test("an expired launch is refused", async () => {
    const r = await forged(() => undefined, { issuedAgoS: 3600, expiresInS: 300 });
    expect(r.kind).toBe("expired");
    expect(r.message).toMatch(/has expired/);
  });

  test("a launch signed with a key the platform does not publish is refused", async () => {
    const r = await forged(() => undefined, { foreignKey: true });
    expect(r.kind).toBe("bad-signature");
    expect(r.message).toMatch(/not signed by a key Fake Platform \(invented\) publishes/);
  });

  test("a launch for another audience is refused", async () => {
    const r = await forged((c) => (c.aud = "some-other-tool"));
    expect(r.kind).toBe("wrong-audience");
    expect(r.message).toMatch(/addressed to "some-other-tool", not to Ratebook's client id ratebook-tool-test/);
  });

  test("a launch from another issuer is refused", async () => {
    const r = await forged((c) => (c.iss = "https://impostor.example.org"));
    expect(r.kind).toBe("wrong-issuer");
  });

  test("a launch carrying another login's nonce is refused", async () => {
    const r = await forged((c) => (c.nonce = "nonce-of-another-login"));
    expect(r.kind).toBe("wrong-nonce");
  });

  test("a launch for a deployment that is not registered is refused, at login and at launch", async () => {
    const atLogin = await refusal((await initiate("lp-2001", "ctx-kin-201", { lti_deployment_id: "dep-unknown" })).res);
    expect(atLogin.kind).toBe("unknown-deployment");
    expect(atLogin.message).toMatch(/deployment dep-unknown of Fake Platform \(invented\) is not registered/);
    const atLaunch = await forged((c) => (c[LTI.deploymentId] = "dep-unknown"));
    expect(atLaunch.kind).toBe("unknown-deployment");
    expect(atLaunch.status).toBe(403);
  });

  test("a launch with no role Ratebook maps is refused", async () => {
    const r = await forged((c) => (c[LTI.roles] = [LIS_ROLES.mentor]));
    expect(r.kind).toBe("no-role");
  });

  test("a login from a platform nobody registered is refused", async () => {
    const r = await refusal((await initiate("lp-2001", "ctx-kin-201", { iss: "https://unregistered.example.org" })).res);
    expect(r.kind).toBe("unknown-platform");
    expect(r.message).toMatch(/No learning platform with issuer https:\/\/unregistered\.example\.org/);
  });

  test("a student cannot register a platform", async () => {
    const student = await signInAs("student@demo.ratebook.invalid", "demo-student-pass");
    const res = await call(adminLti, request("/admin/lti", { cookie: student, form: { intent: "register", name: "x" } }));
    expect(statusOf(res)).toBe(403);
  });
});
