// API tokens end with the credentials and powers they were made under (issue 15): a password
// change, a password reset and a lowered account role revoke every live token of the person
// (audited); and one person holds at most MAX_LIVE_TOKENS live tokens.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as tokensAction } from "~/routes/api/tokens";
import { loader as meLoader } from "~/routes/api/me";
import { action as accountAction } from "~/routes/account";
import { action as forgotAction } from "~/routes/auth/password-forgot";
import { action as resetAction } from "~/routes/auth/password-reset";
import { createApiToken, MAX_LIVE_TOKENS, TOKEN_CAP_MESSAGE } from "~/.server/api-tokens.server";
import { changeUserRole } from "~/.server/people.server";
import { AuditEntry, User } from "~/.server/db/models.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { hashPassword } from "~/.server/passwords.server";
import { call, linkToken, payloadOf, request, signInAs, statusOf, waitForMail } from "./helpers";

const BASE = "http://127.0.0.1:3100";
const PASSWORD = "lifetime-pass-123";
let person: User;
let admin: User;

beforeAll(async () => {
  const hash = await hashPassword(PASSWORD);
  person = await User.create({ email: "token-life@test.ratebook.invalid", displayName: "Token Life (invented)", role: "course-creator", passwordHash: hash });
  admin = await User.create({ email: "token-life-admin@test.ratebook.invalid", displayName: "Token Admin (invented)", role: "admin", passwordHash: hash });
});
afterAll(async () => {
  await User.destroy({ where: { id: [person.id, admin.id] } });
  await closeSequelize();
});

async function meWith(token: string) {
  const res = (await call(meLoader, new Request(`${BASE}/api/me`, { headers: { Authorization: `Bearer ${token}` } }))) as Response;
  return res.status;
}

describe("API tokens end with a password or a role", () => {
  test("changing one's password revokes every live token", async () => {
    const t1 = await createApiToken(person, "script one", null);
    const t2 = await createApiToken(person, "script two", 30);
    expect(await meWith(t1.token)).toBe(200);
    const cookie = await signInAs(person.email, PASSWORD);
    const res = await call(accountAction, request("/account", { cookie, form: { intent: "change-password", current: PASSWORD, password: "lifetime-pass-456", confirm: "lifetime-pass-456" } }));
    expect(statusOf(res)).toBeLessThan(400);
    expect(await meWith(t1.token)).toBe(401);
    expect(await meWith(t2.token)).toBe(401);
    expect(await AuditEntry.count({ where: { action: "api-token.revoked-all", entityId: String(person.id) } })).toBe(1);
  });

  test("a password reset revokes every live token", async () => {
    const t = await createApiToken(person, "after change", null);
    expect(await meWith(t.token)).toBe(200);
    await call(forgotAction, request("/password/forgot", { form: { email: person.email } }));
    const mails = await waitForMail(person.email);
    const token = linkToken(mails[mails.length - 1].text, "/password/reset");
    const res = await call(resetAction, request(`/password/reset/${token}`, { form: { password: "lifetime-pass-789", confirm: "lifetime-pass-789" } }), { token });
    expect(statusOf(res)).toBeLessThan(400);
    expect(await meWith(t.token)).toBe(401);
  });

  test("a lowered account role revokes the tokens; a raised one keeps them", async () => {
    const t = await createApiToken(person, "before demotion", null);
    expect((await changeUserRole(admin, person.id, "admin")).ok).toBe(true);
    expect(await meWith(t.token)).toBe(200);
    expect((await changeUserRole(admin, person.id, "member")).ok).toBe(true);
    expect(await meWith(t.token)).toBe(401);
  });

  test(`at most ${MAX_LIVE_TOKENS} live tokens per person, through the API and the account page`, async () => {
    for (let i = 0; i < MAX_LIVE_TOKENS; i++) await createApiToken(person, `cap ${i}`, null);
    const cookie = await signInAs(person.email, "lifetime-pass-789");
    const api = (await call(tokensAction, new Request(`${BASE}/api/tokens`, {
      method: "POST", headers: { Cookie: cookie, Origin: BASE, "Content-Type": "application/json" }, body: JSON.stringify({ name: "one too many" }),
    }))) as Response;
    expect(api.status).toBe(409);
    expect(((await api.json()) as { errors: Array<{ message: string }> }).errors[0].message).toBe(TOKEN_CAP_MESSAGE);
    const page = await call(accountAction, request("/account", { cookie, form: { intent: "create-token", tokenName: "one too many" } }));
    expect(statusOf(page)).toBe(409);
    expect(payloadOf(page).errors.tokenName).toBe(TOKEN_CAP_MESSAGE);
    // an expired or revoked token does not count: revoking one makes room
    const first = await call(accountAction, request("/account", { cookie, form: { intent: "revoke-token", tokenId: String((await createdIds())[0]) } }));
    expect(statusOf(first)).toBe(200);
    const again = await call(accountAction, request("/account", { cookie, form: { intent: "create-token", tokenName: "room again" } }));
    expect(statusOf(again)).toBe(200);
  });
});

async function createdIds() {
  const { ApiToken } = await import("~/.server/db/api-token.server");
  return (await ApiToken.findAll({ where: { userId: person.id, revokedAt: null }, order: [["id", "ASC"]] })).map((t) => t.id);
}
