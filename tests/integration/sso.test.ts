// Single sign-on against the local fake institution (a real OpenID provider, oidc-provider 9, run
// by the global setup with invented people): linking by verified e-mail and by the roster's
// student number, the unknown-person page, refused state / nonce / PKCE / replayed answers, sign-out,
// password sign-in beside it, and a course that requires the institution's sign-in.
import { beforeAll, describe, expect, test } from "vitest";
import * as oidc from "openid-client";
import { loader as signInPage } from "~/routes/auth/sign-in";
import { loader as ssoStart } from "~/routes/auth/sso-start";
import { loader as ssoReturn } from "~/routes/auth/sso-return";
import { action as signOut } from "~/routes/auth/sign-out";
import { action as courseAction } from "~/routes/courses/course";
import { action as signInAction } from "~/routes/auth/sign-in";
import { ssoFlowCookie, type SsoFlow } from "~/.server/sso/oidc.server";
import { currentUser } from "~/.server/guards.server";
import { AuditEntry, Course, CourseMembership, User } from "~/.server/db/models.server";
import { UserIdentity } from "~/.server/db/user-identity.server";
import { UserSession } from "~/.server/db/user-session.server";
import { call, cookieFrom, payloadOf, request, signInAs, statusOf } from "./helpers";
import { signInAtFakeInstitution } from "../support/fake-institution-browser";
import { testEnv, TEST_APP_PORT } from "../setup/test-env";

const APP_ORIGIN = `http://127.0.0.1:${TEST_APP_PORT}`;
const ISSUER = testEnv.OIDC_ISSUER;

/** Starts a sign-in in Ratebook: the fake's authorisation address and this browser's flow cookie. */
async function start(returnTo = "/dashboard") {
  const res: Response = await call(ssoStart, request(`/sign-in/institution?returnTo=${encodeURIComponent(returnTo)}`));
  expect(res.status).toBe(302);
  const location = res.headers.get("Location")!;
  expect(location.startsWith(`${ISSUER}/`)).toBe(true);
  return { authorizationUrl: location, flowCookie: cookieFrom(res) };
}

/** The answer's address on Ratebook's side, as the tests' requests see it. */
function returnRequest(back: URL, cookie: string) {
  return request(`${back.pathname}${back.search}`, { cookie });
}

async function fullSignIn(username: string) {
  const { authorizationUrl, flowCookie } = await start();
  const back = await signInAtFakeInstitution(authorizationUrl, username, "institution-pass", APP_ORIGIN);
  expect(back.pathname).toBe("/sign-in/institution/return");
  const res = await call(ssoReturn, returnRequest(back, flowCookie));
  return { res, back, flowCookie };
}

function sessionCookieOf(res: Response): string {
  const line = res.headers.getSetCookie().find((c) => c.startsWith("__ratebook_session="));
  expect(line, "a session cookie").toBeTruthy();
  return line!.split(";")[0];
}

async function flowOf(cookie: string): Promise<SsoFlow> {
  return (await ssoFlowCookie.parse(cookie)) as SsoFlow;
}

async function withFlow(flow: SsoFlow) {
  return (await ssoFlowCookie.serialize(flow)).split(";")[0];
}

describe("single sign-on with the institution", () => {
  beforeAll(async () => {
    // The roster's student number for a student whose institution address differs (invented).
    const cam = await User.findOne({ where: { email: "student4@demo.ratebook.invalid" } });
    await CourseMembership.update({ studentNumber: "D0000004" }, { where: { userId: cam!.id } });
  });

  test("the sign-in page offers the institution beside the password form", async () => {
    const page = await call(signInPage, request("/sign-in"));
    expect(page.sso).toEqual({ label: null });
  });

  test("the request to the institution uses PKCE (S256), a state and a nonce", async () => {
    const { authorizationUrl, flowCookie } = await start();
    const url = new URL(authorizationUrl);
    const flow = await flowOf(flowCookie);
    expect(url.searchParams.get("response_type")).toBe("code");
    expect(url.searchParams.get("code_challenge_method")).toBe("S256");
    // RFC 7636 4.2: the challenge is BASE64URL(SHA256(verifier)); computed here by openid-client's own helper.
    expect(url.searchParams.get("code_challenge")).toBe(await oidc.calculatePKCECodeChallenge(flow.verifier));
    expect(url.searchParams.get("state")).toBe(flow.state);
    expect(url.searchParams.get("nonce")).toBe(flow.nonce);
    expect(url.searchParams.get("redirect_uri")).toBe(`${APP_ORIGIN}/sign-in/institution/return`);
  });

  test("a first sign-in links the rostered account by the verified e-mail; the next uses the link", async () => {
    const sam = await User.findOne({ where: { email: "student@demo.ratebook.invalid" } });
    const usersBefore = await User.count();
    const { res } = await fullSignIn("sam");
    expect(res.status).toBe(302);
    expect(res.headers.get("Location")).toBe("/dashboard");
    const cookie = sessionCookieOf(res);
    const me = await currentUser(request("/dashboard", { cookie }));
    expect(me?.id).toBe(sam!.id);
    const identity = await UserIdentity.findOne({ where: { issuer: ISSUER, subject: "fi-0001" } });
    expect(identity?.userId).toBe(sam!.id);
    expect(identity?.linkedBy).toBe("email");
    expect(await AuditEntry.count({ where: { action: "user.sso-linked", entityId: String(sam!.id) } })).toBe(1);
    const session = await UserSession.findOne({ where: { userId: sam!.id }, order: [["id", "DESC"]] });
    expect(session?.via).toBe("sso");

    const again = await fullSignIn("sam");
    expect(again.res.status).toBe(302);
    expect(await UserIdentity.count({ where: { userId: sam!.id } })).toBe(1);
    expect(await AuditEntry.count({ where: { action: "user.sso-linked", entityId: String(sam!.id) } })).toBe(1);
    expect(await User.count()).toBe(usersBefore);
  });

  test("a different institution address links by the roster's student number", async () => {
    const cam = await User.findOne({ where: { email: "student4@demo.ratebook.invalid" } });
    const { res } = await fullSignIn("cam");
    expect(res.status).toBe(302);
    expect((await currentUser(request("/dashboard", { cookie: sessionCookieOf(res) })))?.id).toBe(cam!.id);
    const identity = await UserIdentity.findOne({ where: { issuer: ISSUER, subject: "fi-0004" } });
    expect(identity?.linkedBy).toBe("institution-id");
  });

  test("someone Ratebook does not know gets a page saying so, and no account", async () => {
    const before = await User.count();
    const { res } = await fullSignIn("visitor");
    expect(statusOf(res)).toBe(403);
    const page = payloadOf(res);
    expect(page.title).toBe("No Ratebook account");
    expect(page.message).toMatch(/Ratebook has no account for visitor@fake-institution\.invalid/);
    expect(page.message).toMatch(/ask your instructor to add you/);
    expect(await User.count()).toBe(before);
    expect(await UserIdentity.count({ where: { subject: "fi-0090" } })).toBe(0);
    expect(res.init.headers["Set-Cookie"]).toMatch(/__ratebook_sso_flow=;/);
  });

  test("an e-mail the institution has not verified never picks an account", async () => {
    const { res } = await fullSignIn("unverified");
    expect(statusOf(res)).toBe(403);
    expect(payloadOf(res).message).toMatch(/has not verified the e-mail address student3@demo\.ratebook\.invalid/);
    expect(await UserIdentity.count({ where: { subject: "fi-0091" } })).toBe(0);
  });

  test("an answer whose state is not this browser's is refused", async () => {
    const { authorizationUrl, flowCookie } = await start();
    const back = await signInAtFakeInstitution(authorizationUrl, "sam", "institution-pass", APP_ORIGIN);
    back.searchParams.set("state", "someone-elses-state");
    const res = await call(ssoReturn, returnRequest(back, flowCookie));
    expect(statusOf(res)).toBe(400);
    expect(payloadOf(res).kind).toBe("state");
    expect(payloadOf(res).message).toMatch(/state does not match/);
  });

  test("an ID token made for another sign-in (wrong nonce) is refused", async () => {
    const { authorizationUrl, flowCookie } = await start();
    const flow = await flowOf(flowCookie);
    const back = await signInAtFakeInstitution(authorizationUrl, "sam", "institution-pass", APP_ORIGIN);
    // The same browser's state and verifier, but the nonce of another sign-in: the provider's token
    // carries the original nonce, which no longer matches.
    const cookie = await withFlow({ ...flow, nonce: oidc.randomNonce() });
    const res = await call(ssoReturn, returnRequest(back, cookie));
    expect(statusOf(res)).toBe(400);
    expect(payloadOf(res).kind).toBe("nonce");
    expect(payloadOf(res).message).toMatch(/nonce does not match/);
  });

  test("a code exchanged with the wrong PKCE verifier is refused by the institution", async () => {
    const { authorizationUrl, flowCookie } = await start();
    const flow = await flowOf(flowCookie);
    const back = await signInAtFakeInstitution(authorizationUrl, "sam", "institution-pass", APP_ORIGIN);
    const cookie = await withFlow({ ...flow, verifier: oidc.randomPKCECodeVerifier() });
    const res = await call(ssoReturn, returnRequest(back, cookie));
    expect(statusOf(res)).toBe(400);
    expect(payloadOf(res).kind).toBe("code");
    expect(payloadOf(res).message).toMatch(/proof key \(PKCE\)/);
  });

  test("a used answer cannot sign in again, with or without the flow cookie", async () => {
    const { res, back, flowCookie } = await fullSignIn("sam");
    expect(res.status).toBe(302);
    // The flow cookie is cleared by the first answer; a copy of it still gets the code refused.
    const replay = await call(ssoReturn, returnRequest(back, flowCookie));
    expect(statusOf(replay)).toBe(400);
    expect(payloadOf(replay).kind).toBe("code");
    const noFlow = await call(ssoReturn, returnRequest(back, ""));
    expect(statusOf(noFlow)).toBe(400);
    expect(payloadOf(noFlow).kind).toBe("no-flow");
    expect(payloadOf(noFlow).message).toMatch(/no institution sign-in in progress/);
  });

  test("the institution's refusal is shown as such", async () => {
    const { flowCookie } = await start();
    const flow = await flowOf(flowCookie);
    const back = new URL(`${APP_ORIGIN}/sign-in/institution/return?error=access_denied&state=${flow.state}`);
    const res = await call(ssoReturn, returnRequest(back, flowCookie));
    expect(statusOf(res)).toBe(400);
    expect(payloadOf(res).message).toMatch(/did not sign you in \(you cancelled, or the institution refused access\)/);
  });

  test("sign-out ends the session started through the institution", async () => {
    const { res } = await fullSignIn("ari");
    const cookie = sessionCookieOf(res);
    expect(await currentUser(request("/dashboard", { cookie }))).not.toBeNull();
    const out = request("/sign-out", { method: "POST", cookie });
    out.headers.set("Origin", "http://127.0.0.1:3100");
    expect((await call(signOut, out)).status).toBe(302);
    expect(await currentUser(request("/dashboard", { cookie }))).toBeNull();
  });

  test("an instructor requires the institution's sign-in: students' passwords stop working, staff keep theirs", async () => {
    const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
    const studentCookie = await signInAs("student2@demo.ratebook.invalid", "demo-student-pass");
    const instructor = await signInAs("instructor@demo.ratebook.invalid", "demo-instructor-pass");
    try {
      const res = await call(courseAction, request(`/courses/${course!.id}`, { cookie: instructor, form: { intent: "sso-required" } }), { courseId: String(course!.id) });
      expect(statusOf(res)).toBe(200);
      expect(payloadOf(res).notice).toMatch(/sign in through their institution only; \d+ password sessions? (was|were) ended/);
      // The student's password session is over; a password no longer signs them in.
      expect(await currentUser(request("/dashboard", { cookie: studentCookie }))).toBeNull();
      const refused = await call(signInAction, request("/sign-in", { form: { email: "student2@demo.ratebook.invalid", password: "demo-student-pass" } }));
      expect(statusOf(refused)).toBe(400);
      expect(payloadOf(refused).error).toMatch(/Students of KIN-DEMO sign in through their institution/);
      // A wrong password still gets the usual answer (the rule is not told to a guesser).
      const wrong = await call(signInAction, request("/sign-in", { form: { email: "student2@demo.ratebook.invalid", password: "not-it" } }));
      expect(payloadOf(wrong).error).toBe("That e-mail and password do not match an account.");
      // Through the institution it works; staff passwords still work.
      expect((await fullSignIn("ari")).res.status).toBe(302);
      expect(await currentUser(request("/dashboard", { cookie: instructor }))).not.toBeNull();
      await signInAs("demonstrator@demo.ratebook.invalid", "demo-demonstrator-pass");
    } finally {
      const off = await call(courseAction, request(`/courses/${course!.id}`, { cookie: instructor, form: { intent: "sso-optional" } }), { courseId: String(course!.id) });
      expect(statusOf(off)).toBe(200);
    }
    await signInAs("student2@demo.ratebook.invalid", "demo-student-pass");
  });

  test("a student cannot switch it", async () => {
    const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
    const student = await signInAs("student5@demo.ratebook.invalid", "demo-student-pass");
    const res = await call(courseAction, request(`/courses/${course!.id}`, { cookie: student, form: { intent: "sso-required" } }), { courseId: String(course!.id) });
    expect(statusOf(res)).toBe(403);
    expect((await Course.findByPk(course!.id))!.ssoRequired).toBe(false);
  });
});
