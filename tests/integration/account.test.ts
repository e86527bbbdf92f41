// Changing one's own password, replaced links, and pruning of old sign-in attempts.
import { describe, expect, test } from "vitest";
import { Op } from "sequelize";
import { action as accountAction, loader as accountLoader } from "~/routes/account";
import { action as forgotAction } from "~/routes/auth/password-forgot";
import { loader as resetLoader } from "~/routes/auth/password-reset";
import { AuditEntry, User } from "~/.server/db/models.server";
import { hashPassword } from "~/.server/passwords.server";
import { call, linkToken, payloadOf, request, signInAs, statusOf, waitForMail } from "./helpers";

async function makeUser(email: string, password: string) {
  return User.create({ email, displayName: "Account test (test)", role: "member", passwordHash: await hashPassword(password) });
}

describe("own password", () => {
  test("needs the current password, a valid new one, and is audited", async () => {
    const email = "account-owner@demo.ratebook.invalid";
    const user = await makeUser(email, "first-password-1");
    const cookie = await signInAs(email, "first-password-1");
    expect(payloadOf(await call(accountLoader, request("/account", { cookie })))).toMatchObject({ email, role: "member" });

    const wrong = await call(accountAction, request("/account", { cookie, form: { current: "nope-nope-nope", password: "second-password-2", confirm: "second-password-2" } }));
    expect(statusOf(wrong)).toBe(400);
    expect(payloadOf(wrong).errors.current).toBe("That is not your current password.");
    const same = await call(accountAction, request("/account", { cookie, form: { current: "first-password-1", password: "first-password-1", confirm: "first-password-1" } }));
    expect(payloadOf(same).errors.password).toMatch(/different from the current/);

    const ok = await call(accountAction, request("/account", { cookie, form: { current: "first-password-1", password: "second-password-2", confirm: "second-password-2" } }));
    expect(payloadOf(ok).changed).toBe(true);
    await signInAs(email, "second-password-2");
    expect(await AuditEntry.count({ where: { action: "user.password-changed", entityId: String(user.id) } })).toBe(1);
  });

  test("signed out, the account page sends you to sign-in", async () => {
    const res = await call(accountLoader, request("/account"));
    expect(res.headers.get("Location")).toBe("/sign-in?returnTo=%2Faccount");
  });
});

describe("a new link replaces the older one", () => {
  test("two reset requests: only the newest link works", async () => {
    const email = "two-resets@demo.ratebook.invalid";
    await makeUser(email, "some-password-1");
    await call(forgotAction, request("/password/forgot", { form: { email } }));
    await call(forgotAction, request("/password/forgot", { form: { email } }));
    const mails = await waitForMail(email, 2);
    expect(mails).toHaveLength(2);
    const [older, newer] = mails.map((m) => linkToken(m.text, "/password/reset"));
    expect(payloadOf(await call(resetLoader, request(`/password/reset/${older}`), { token: older }))).toMatchObject({ valid: false, message: expect.stringMatching(/newest reset e-mail/) });
    expect(payloadOf(await call(resetLoader, request(`/password/reset/${newer}`), { token: newer }))).toMatchObject({ valid: true });
  });
});
