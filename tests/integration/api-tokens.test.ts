// Personal API tokens against the real database: made once (only the hash kept), used as
// Authorization: Bearer on the API, refused at once when revoked or expired, never on pages,
// and a student's token reaches only what that student reaches.
import crypto from "node:crypto";
import { describe, expect, test } from "vitest";
import { action as tokensAction } from "~/routes/api/tokens";
import { action as tokenAction } from "~/routes/api/token";
import { loader as meLoader } from "~/routes/api/me";
import { loader as coursesLoader } from "~/routes/api/courses";
import { action as fitAction } from "~/routes/api/fit";
import { loader as courseGradebook } from "~/routes/api/course-gradebook";
import { loader as dashboardLoader } from "~/routes/dashboard";
import { action as accountAction, loader as accountLoader } from "~/routes/account";
import { ApiToken } from "~/.server/db/api-token.server";
import { AuditEntry } from "~/.server/db/models.server";
import { call, demoCookie, payloadOf, request, statusOf } from "./helpers";

const BASE = "http://127.0.0.1:3100";

function apiRequest(path: string, init: { method?: string; cookie?: string; bearer?: string; json?: unknown; body?: string; origin?: string } = {}) {
  const headers = new Headers();
  if (init.cookie) headers.set("Cookie", init.cookie);
  if (init.bearer !== undefined) headers.set("Authorization", `Bearer ${init.bearer}`);
  if (init.origin) headers.set("Origin", init.origin);
  const body = init.json !== undefined ? JSON.stringify(init.json) : init.body;
  if (body !== undefined) headers.set("Content-Type", "application/json");
  return new Request(BASE + path, { method: init.method ?? (body !== undefined ? "POST" : "GET"), headers, body });
}

async function makeToken(cookie: string, json: unknown = { name: "test script" }) {
  const res: Response = await call(tokensAction, apiRequest("/api/tokens", { cookie, json, origin: BASE }));
  return { status: res.status, body: await res.json() };
}

async function me(bearer: string) {
  const res: Response = await call(meLoader, apiRequest("/api/me", { bearer }));
  return { status: res.status, body: await res.json() };
}

describe("API tokens", () => {
  test("made with the session cookie: 201 with the token once; only its SHA-256 is stored; audited", async () => {
    const cookie = await demoCookie("instructor");
    const { status, body } = await makeToken(cookie, { name: "  gradebook sync  ", expiresInDays: 30 });
    expect(status).toBe(201);
    expect(body.token).toMatch(/^rbk_[A-Za-z0-9_-]{40,}$/);
    expect(body.name).toBe("gradebook sync");
    const row = (await ApiToken.findByPk(body.id))!;
    expect(row.tokenHash).toBe(crypto.createHash("sha256").update(body.token).digest("hex"));
    expect(JSON.stringify(row.toJSON())).not.toContain(body.token);
    // 30 days from now, within the test's own run time
    expect(Math.abs(row.expiresAt!.getTime() - (Date.now() + 30 * 86_400_000))).toBeLessThan(60_000);
    expect(await AuditEntry.count({ where: { action: "api-token.created", entityId: String(body.id) } })).toBe(1);
  });

  test("the token signs API calls in as its owner", async () => {
    const cookie = await demoCookie("instructor");
    const { body } = await makeToken(cookie);
    const res = await me(body.token);
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe("instructor@demo.ratebook.invalid");
    expect(res.body.courses.map((c: any) => c.code)).toContain("KIN-DEMO");
  });

  test("bad requests say what is wrong with which field", async () => {
    const cookie = await demoCookie("instructor");
    const empty = await makeToken(cookie, { name: "   " });
    expect(empty.status).toBe(400);
    expect(empty.body.errors).toEqual([expect.objectContaining({ path: "name" })]);
    const long = await makeToken(cookie, { name: "x".repeat(81) });
    expect(long.body.errors[0].message).toContain("81");
    for (const days of [0, 1.5, 400, "soon"]) {
      const bad = await makeToken(cookie, { name: "n", expiresInDays: days });
      expect(bad.status, `expiresInDays ${days}`).toBe(400);
      expect(bad.body.errors[0].path).toBe("expiresInDays");
    }
    const notJson: Response = await call(tokensAction, apiRequest("/api/tokens", { cookie, body: "{name:", origin: BASE }));
    expect(notJson.status).toBe(400);
    expect((await notJson.json()).errors[0].message).toMatch(/not valid JSON/);
  });

  test("a token cannot make tokens, a cross-site page cannot either, and signed out is 401", async () => {
    const cookie = await demoCookie("instructor");
    const { body } = await makeToken(cookie);
    const byToken: Response = await call(tokensAction, apiRequest("/api/tokens", { bearer: body.token, json: { name: "more" } }));
    expect(byToken.status).toBe(403);
    const crossSite: Response = await call(tokensAction, apiRequest("/api/tokens", { cookie, json: { name: "evil" }, origin: "https://elsewhere.example" }));
    expect(crossSite.status).toBe(403);
    const signedOut: Response = await call(tokensAction, apiRequest("/api/tokens", { json: { name: "x" } }));
    expect(signedOut.status).toBe(401);
  });

  test("revoked: 204 for its owner, 404 for anyone else, then refused at once with 401", async () => {
    const owner = await demoCookie("instructor");
    const other = await demoCookie("demonstrator");
    const { body } = await makeToken(owner);
    expect((await me(body.token)).status).toBe(200);
    const byOther: Response = await call(tokenAction, apiRequest(`/api/tokens/${body.id}`, { method: "DELETE", cookie: other, origin: BASE }), { tokenId: String(body.id) });
    expect(byOther.status).toBe(404);
    expect((await me(body.token)).status).toBe(200);
    const revoke: Response = await call(tokenAction, apiRequest(`/api/tokens/${body.id}`, { method: "DELETE", cookie: owner, origin: BASE }), { tokenId: String(body.id) });
    expect(revoke.status).toBe(204);
    const after = await me(body.token);
    expect(after.status).toBe(401);
    expect(after.body.error).toMatch(/revoked/);
    expect(await AuditEntry.count({ where: { action: "api-token.revoked", entityId: String(body.id) } })).toBe(1);
    const badId: Response = await call(tokenAction, apiRequest("/api/tokens/abc", { method: "DELETE", cookie: owner, origin: BASE }), { tokenId: "abc" });
    expect(badId.status).toBe(404);
  });

  test("a token can revoke itself", async () => {
    const { body } = await makeToken(await demoCookie("demonstrator"));
    const res: Response = await call(tokenAction, apiRequest(`/api/tokens/${body.id}`, { method: "DELETE", bearer: body.token }), { tokenId: String(body.id) });
    expect(res.status).toBe(204);
    expect((await me(body.token)).status).toBe(401);
  });

  test("expired: refused with 401 the moment its time has passed", async () => {
    const { body } = await makeToken(await demoCookie("instructor"), { name: "short", expiresInDays: 1 });
    expect((await me(body.token)).status).toBe(200);
    await ApiToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: body.id } });
    const res = await me(body.token);
    expect(res.status).toBe(401);
    expect(res.body.error).toMatch(/expired/);
  });

  test("unknown and malformed tokens get 401, never the cookie's person", async () => {
    const cookie = await demoCookie("instructor");
    for (const bearer of ["", "rbk_not-a-token-that-exists-anywhere", "plainly wrong"]) {
      const res: Response = await call(meLoader, apiRequest("/api/me", { bearer, cookie }));
      expect(res.status, `Bearer "${bearer}"`).toBe(401);
    }
  });

  test("pages do not take tokens: a token on /dashboard is sent to sign in", async () => {
    const { body } = await makeToken(await demoCookie("instructor"));
    const res = await call(dashboardLoader, apiRequest("/dashboard", { bearer: body.token }));
    expect(statusOf(res)).toBe(302);
    expect(res.headers.get("Location")).toMatch(/^\/sign-in/);
  });

  test("a student's token reaches what the student reaches, and no more", async () => {
    const { body } = await makeToken(await demoCookie("student"));
    const mine = await me(body.token);
    expect(mine.body.user.email).toBe("student@demo.ratebook.invalid");
    const courses: Response = await call(coursesLoader, apiRequest("/api/courses", { bearer: body.token }));
    const list = await courses.json();
    expect(list.length).toBeGreaterThan(0);
    expect(list.every((c: any) => c.role === "student")).toBe(true);
    const fit: Response = await call(fitAction, apiRequest("/api/fit", { bearer: body.token, json: {} }));
    expect(fit.status).toBe(403);
    // The gradebook is staff only: the student's own course's gradebook is refused, the instructor's token reads it.
    const courseId = String(list[0].id);
    const asStudent: Response = await call(courseGradebook, apiRequest(`/api/courses/${courseId}/gradebook`, { bearer: body.token }), { courseId });
    expect(asStudent.status).toBe(403);
    const staff = await makeToken(await demoCookie("instructor"));
    const asStaff: Response = await call(courseGradebook, apiRequest(`/api/courses/${courseId}/gradebook`, { bearer: staff.body.token }), { courseId });
    expect(asStaff.status).toBe(200);
    expect((await asStaff.json()).rows.some((r: any) => r.email === "student@demo.ratebook.invalid")).toBe(true);
  });

  test("the account page makes a token, shows it once, lists it without it, and revokes it", async () => {
    const cookie = await demoCookie("demonstrator");
    const made = payloadOf(await call(accountAction, request("/account", { cookie, form: { intent: "create-token", tokenName: "lab laptop", expiresInDays: "7" } })));
    expect(made.newToken.token).toMatch(/^rbk_/);
    const page = payloadOf(await call(accountLoader, request("/account", { cookie })));
    const listed = page.tokens.find((t: any) => t.name === "lab laptop");
    expect(listed.state).toBe("live");
    expect(JSON.stringify(page)).not.toContain(made.newToken.token);
    expect(made.newToken.token.startsWith(listed.tokenStart)).toBe(true);
    const bad = await call(accountAction, request("/account", { cookie, form: { intent: "create-token", tokenName: "", expiresInDays: "" } }));
    expect(statusOf(bad)).toBe(400);
    expect(payloadOf(bad).errors.name).toBeTruthy();
    const revoked = payloadOf(await call(accountAction, request("/account", { cookie, form: { intent: "revoke-token", tokenId: String(listed.id) } })));
    expect(revoked.notice).toMatch(/revoked/);
    expect((await me(made.newToken.token)).status).toBe(401);
  });
});
