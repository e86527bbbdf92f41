// Invitations and password resets: e-mail through the local sink, single use, expiry.
import { describe, expect, test } from "vitest";
import { action as signIn } from "~/routes/auth/sign-in";
import { action as courseAction } from "~/routes/courses/course";
import { loader as invitationLoader, action as invitationAction } from "~/routes/auth/invitation";
import { action as forgotAction } from "~/routes/auth/password-forgot";
import { loader as resetLoader, action as resetAction } from "~/routes/auth/password-reset";
import { AuthToken, User, CourseMembership } from "~/.server/db/models.server";
import { hashPassword } from "~/.server/passwords.server";
import { call, demoCookie, linkToken, mailTo, payloadOf, request, statusOf, waitForMail } from "./helpers";

async function invite(email: string, role = "student") {
  const cookie = await demoCookie("instructor");
  return call(courseAction, request("/courses/1", { cookie, form: { intent: "invite", email, displayName: "Invitee (test)", role } }), { courseId: "1" });
}

async function latestLink(email: string, prefix: string) {
  const mails = await waitForMail(email);
  return linkToken(mails[mails.length - 1].text, prefix);
}

describe("invitation", () => {
  test("an instructor invites a new person: account, membership, e-mail; accepting signs them in once", async () => {
    const email = "new-student@demo.ratebook.invalid";
    const res = await invite(email);
    expect(payloadOf(res).notice).toBe(`Invitation sent to ${email}.`);
    const user = await User.findOne({ where: { email } });
    expect(user?.passwordHash).toBeNull();
    expect(await CourseMembership.count({ where: { userId: user!.id, courseId: 1, role: "student" } })).toBe(1);

    const token = await latestLink(email, "/invitation");
    expect(payloadOf(await call(invitationLoader, request(`/invitation/${token}`), { token }))).toMatchObject({ valid: true, email });

    const short = await call(invitationAction, request(`/invitation/${token}`, { form: { password: "short", confirm: "short", displayName: "Invitee" } }), { token });
    expect(statusOf(short)).toBe(400);
    expect(payloadOf(short).errors.password).toMatch(/at least 10/);
    const differ = await call(invitationAction, request(`/invitation/${token}`, { form: { password: "long-enough-1", confirm: "long-enough-2", displayName: "Invitee" } }), { token });
    expect(payloadOf(differ).errors.password).toBe("The two passwords differ.");

    const ok = await call(invitationAction, request(`/invitation/${token}`, { form: { password: "long-enough-1", confirm: "long-enough-1", displayName: "Invitee Renamed" } }), { token });
    expect(ok.status).toBe(302);
    expect(ok.headers.get("Set-Cookie")).toMatch(/__ratebook_session=/);
    expect((await User.findOne({ where: { email } }))?.displayName).toBe("Invitee Renamed");

    // Reused: refused, with a message that says why.
    const again = await call(invitationAction, request(`/invitation/${token}`, { form: { password: "long-enough-9", confirm: "long-enough-9", displayName: "X" } }), { token });
    expect(payloadOf(again).errors.form).toMatch(/already been accepted/);
    expect(payloadOf(await call(invitationLoader, request(`/invitation/${token}`), { token }))).toMatchObject({ valid: false, message: expect.stringMatching(/already been accepted/) });
    // The new password works.
    expect((await call(signIn, request("/sign-in", { form: { email, password: "long-enough-1" } }))).status).toBe(302);
  });

  test("an expired invitation is refused", async () => {
    const email = "late-student@demo.ratebook.invalid";
    await invite(email);
    const token = await latestLink(email, "/invitation");
    const user = await User.findOne({ where: { email } });
    await AuthToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: user!.id } });
    expect(payloadOf(await call(invitationLoader, request(`/invitation/${token}`), { token }))).toMatchObject({ valid: false, message: expect.stringMatching(/expired/) });
    const res = await call(invitationAction, request(`/invitation/${token}`, { form: { password: "long-enough-1", confirm: "long-enough-1", displayName: "Late" } }), { token });
    expect(payloadOf(res).errors.form).toMatch(/expired/);
    expect((await User.findByPk(user!.id))?.passwordHash).toBeNull();
  });

  test("an unknown token and bad invitation input give clear messages", async () => {
    expect(payloadOf(await call(invitationLoader, request("/invitation/nonsense"), { token: "nonsense" }))).toMatchObject({ valid: false, message: expect.stringMatching(/not valid/) });
    const bad = await call(courseAction, request("/courses/1", { cookie: await demoCookie("instructor"), form: { intent: "invite", email: "nope", displayName: "", role: "boss" } }), { courseId: "1" });
    expect(statusOf(bad)).toBe(400);
    expect(payloadOf(bad).errors).toMatchObject({ email: expect.any(String), displayName: expect.any(String), role: expect.stringMatching(/instructor, demonstrator, student/) });
    expect(payloadOf(bad).values).toMatchObject({ email: "nope" });
  });
});

describe("password reset", () => {
  test("request, e-mail, reset once, sign in with the new password", async () => {
    // A person of this test's own: changing a demo password would break later tests that sign in as demo people.
    const email = "reset-once@demo.ratebook.invalid";
    await User.create({ email, displayName: "Reset test (test)", role: "member", passwordHash: await hashPassword("demo-demonstrator-pass") });
    const sent = await call(forgotAction, request("/password/forgot", { form: { email } }));
    expect(payloadOf(sent).sent).toBe(true);
    const token = await latestLink(email, "/password/reset");
    expect(payloadOf(await call(resetLoader, request(`/password/reset/${token}`), { token }))).toMatchObject({ valid: true, email });
    const res = await call(resetAction, request(`/password/reset/${token}`, { form: { password: "fresh-password-1", confirm: "fresh-password-1" } }), { token });
    expect(res.status).toBe(302);
    expect(res.headers.get("Location")).toBe("/sign-in?reset=1");
    const reused = await call(resetAction, request(`/password/reset/${token}`, { form: { password: "fresh-password-2", confirm: "fresh-password-2" } }), { token });
    expect(payloadOf(reused).errors.form).toMatch(/already been used/);
    expect((await call(signIn, request("/sign-in", { form: { email, password: "fresh-password-1" } }))).status).toBe(302);
    expect(statusOf(await call(signIn, request("/sign-in", { form: { email, password: "demo-demonstrator-pass" } })))).toBe(400);
  });

  test("an unknown e-mail gets the same answer and no mail; a malformed one gets a message", async () => {
    const email = "ghost@demo.ratebook.invalid";
    expect(payloadOf(await call(forgotAction, request("/password/forgot", { form: { email } }))).sent).toBe(true);
    await new Promise((r) => setTimeout(r, 200));
    expect(await mailTo(email)).toHaveLength(0);
    const bad = await call(forgotAction, request("/password/forgot", { form: { email: "ghost" } }));
    expect(statusOf(bad)).toBe(400);
    expect(payloadOf(bad).errors.email).toMatch(/e-mail address/);
  });

  test("an expired reset link is refused and the password stays", async () => {
    const email = "student2@demo.ratebook.invalid";
    await call(forgotAction, request("/password/forgot", { form: { email } }));
    const token = await latestLink(email, "/password/reset");
    const user = await User.findOne({ where: { email } });
    await AuthToken.update({ expiresAt: new Date(Date.now() - 1) }, { where: { userId: user!.id, purpose: "password-reset" } });
    const res = await call(resetAction, request(`/password/reset/${token}`, { form: { password: "fresh-password-1", confirm: "fresh-password-1" } }), { token });
    expect(payloadOf(res).errors.form).toMatch(/expired/);
    expect((await call(signIn, request("/sign-in", { form: { email, password: "demo-student-pass" } }))).status).toBe(302);
  });
});
