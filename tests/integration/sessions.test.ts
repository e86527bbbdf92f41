// Sessions live on the server: ending one (sign-out, the account page, a password change or
// reset, a role taken away, a removed account) makes every copy of its cookie useless at once.
import { describe, expect, test } from "vitest";
import { loader as dashboardLoader } from "~/routes/dashboard";
import { action as signOutAction } from "~/routes/auth/sign-out";
import { action as accountAction, loader as accountLoader } from "~/routes/account";
import { action as forgotAction } from "~/routes/auth/password-forgot";
import { action as resetAction } from "~/routes/auth/password-reset";
import { action as peopleAction } from "~/routes/admin/people";
import { User } from "~/.server/db/models.server";
import { UserSession } from "~/.server/db/user-session.server";
import { hashPassword } from "~/.server/passwords.server";
import { removeAccount } from "~/.server/people.server";
import { call, demoCookie, linkToken, payloadOf, request, signInAs, statusOf, waitForMail } from "./helpers";

async function makeUser(email: string, password: string, role: User["role"] = "member") {
  return User.create({ email, displayName: "Session test (test)", role, passwordHash: await hashPassword(password) });
}

async function signedIn(cookie: string) {
  const res = await call(dashboardLoader, request("/dashboard", { cookie }));
  return statusOf(res) === 200;
}

describe("server-side sessions", () => {
  test("the cookie carries only a random token; the database keeps its hash, not the token", async () => {
    const email = "session-cookie@demo.ratebook.invalid";
    const user = await makeUser(email, "session-pass-1");
    const cookie = await signInAs(email, "session-pass-1");
    const value = decodeURIComponent(cookie.split("=")[1]);
    const token = JSON.parse(Buffer.from(value.split(".")[0], "base64").toString("utf8"));
    expect(typeof token).toBe("string");
    expect(token).not.toContain(String(user.id));
    const rows = await UserSession.findAll({ where: { userId: user.id } });
    expect(rows).toHaveLength(1);
    expect(rows[0].tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(rows[0].tokenHash).not.toBe(token);
  });

  test("after sign-out a copied cookie no longer works", async () => {
    const email = "session-copy@demo.ratebook.invalid";
    await makeUser(email, "session-pass-2");
    const cookie = await signInAs(email, "session-pass-2");
    const copy = cookie;
    expect(await signedIn(copy)).toBe(true);
    const out = await call(signOutAction, request("/sign-out", { cookie, method: "POST" }));
    expect(out.headers.get("Location")).toBe("/sign-in");
    expect(await signedIn(copy)).toBe(false);
  });

  test("a password change ends every other session and keeps this one", async () => {
    const email = "session-change@demo.ratebook.invalid";
    await makeUser(email, "session-pass-3");
    const here = await signInAs(email, "session-pass-3");
    const elsewhere = await signInAs(email, "session-pass-3");
    const res = await call(accountAction, request("/account", { cookie: here, form: { intent: "change-password", current: "session-pass-3", password: "session-pass-3b", confirm: "session-pass-3b" } }));
    expect(payloadOf(res).changed).toBe(true);
    expect(await signedIn(here)).toBe(true);
    expect(await signedIn(elsewhere)).toBe(false);
  });

  test("a completed reset ends every session", async () => {
    const email = "session-reset@demo.ratebook.invalid";
    await makeUser(email, "session-pass-4");
    const a = await signInAs(email, "session-pass-4");
    const b = await signInAs(email, "session-pass-4");
    await call(forgotAction, request("/password/forgot", { form: { email } }));
    const token = linkToken((await waitForMail(email))[0].text, "/password/reset");
    const done = await call(resetAction, request(`/password/reset/${token}`, { form: { password: "session-pass-4b", confirm: "session-pass-4b" } }), { token });
    expect(done.status).toBe(302);
    expect(await signedIn(a)).toBe(false);
    expect(await signedIn(b)).toBe(false);
  });

  test("taking an account role away signs the person out; a promotion does not", async () => {
    const email = "session-role@demo.ratebook.invalid";
    const user = await makeUser(email, "session-pass-5", "course-creator");
    const cookie = await signInAs(email, "session-pass-5");
    const admin = await demoCookie("admin");
    await call(peopleAction, request("/admin/people", { cookie: admin, form: { userId: String(user.id), role: "admin" } }));
    expect(await signedIn(cookie)).toBe(true);
    await call(peopleAction, request("/admin/people", { cookie: admin, form: { userId: String(user.id), role: "member" } }));
    expect(await signedIn(cookie)).toBe(false);
  });

  test("a removed account's sessions end with it", async () => {
    const email = "session-removed@demo.ratebook.invalid";
    const user = await makeUser(email, "session-pass-6");
    const cookie = await signInAs(email, "session-pass-6");
    const admin = await User.findOne({ where: { email: "admin@demo.ratebook.invalid" } });
    expect((await removeAccount(admin!, user.id)).ok).toBe(true);
    expect(await signedIn(cookie)).toBe(false);
    expect(await UserSession.count({ where: { userId: user.id } })).toBe(0);
  });

  test("the account page lists live sessions and ends one, or all the others", async () => {
    const email = "session-list@demo.ratebook.invalid";
    await makeUser(email, "session-pass-7");
    const here = await signInAs(email, "session-pass-7");
    const second = await signInAs(email, "session-pass-7");
    const third = await signInAs(email, "session-pass-7");
    const page = payloadOf(await call(accountLoader, request("/account", { cookie: here })));
    expect(page.sessions).toHaveLength(3);
    expect(page.sessions.filter((s: { current: boolean }) => s.current)).toHaveLength(1);
    const secondId = payloadOf(await call(accountLoader, request("/account", { cookie: second }))).sessions.find((s: { current: boolean }) => s.current).id;
    const ended = await call(accountAction, request("/account", { cookie: here, form: { intent: "end-session", sessionId: String(secondId) } }));
    expect(statusOf(ended)).toBe(200);
    expect(await signedIn(second)).toBe(false);
    expect(await signedIn(third)).toBe(true);
    const bad = await call(accountAction, request("/account", { cookie: here, form: { intent: "end-session", sessionId: "x1" } }));
    expect(statusOf(bad)).toBe(400);
    const rest = await call(accountAction, request("/account", { cookie: here, form: { intent: "end-other-sessions" } }));
    expect(payloadOf(rest).notice).toBe("1 other session is ended.");
    expect(await signedIn(third)).toBe(false);
    expect(await signedIn(here)).toBe(true);
    // Someone else's session id is refused.
    const other = await demoCookie("student");
    const otherId = payloadOf(await call(accountLoader, request("/account", { cookie: other }))).sessions.find((s: { current: boolean }) => s.current).id;
    expect(statusOf(await call(accountAction, request("/account", { cookie: here, form: { intent: "end-session", sessionId: String(otherId) } })))).toBe(404);
    expect(await signedIn(other)).toBe(true);
  });
});
