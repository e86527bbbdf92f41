// Request limits kept in PostgreSQL (throttle.server.ts): each case is a way the earlier
// per-e-mail lock could be walked around or turned against an instructor.
import crypto from "node:crypto";
import { afterEach, describe, expect, test } from "vitest";
import { action as signIn } from "~/routes/auth/sign-in";
import { action as signOut } from "~/routes/auth/sign-out";
import { action as forgotAction } from "~/routes/auth/password-forgot";
import { action as fitAction } from "~/routes/api/fit";
import { action as tokensAction } from "~/routes/api/tokens";
import { action as previewAction } from "~/routes/api/submission-preview";
import { loader as apiNotFound, action as apiNotFoundAction } from "~/routes/api/not-found";
import { User } from "~/.server/db/models.server";
import { hashPassword } from "~/.server/passwords.server";
import { config } from "~/.server/config.server";
import { LIMITS } from "~/.server/throttle.server";
import { call, demoCookie, payloadOf, request, statusOf } from "./helpers";

const BASE = "http://127.0.0.1:3100";
const peer = () => `peer-${crypto.randomUUID()}`;
const tag = () => crypto.randomUUID().slice(0, 8);

function signInForm(email: string, password: string, init: { cookie?: string; forwarded?: string } = {}) {
  const req = request("/sign-in", { form: { email, password, returnTo: "/dashboard" }, cookie: init.cookie });
  if (init.forwarded) req.headers.set("X-Forwarded-For", init.forwarded);
  return req;
}

async function person(password: string) {
  const email = `limits-${tag()}@demo.ratebook.invalid`;
  await User.create({ email, displayName: "Limits test (test)", role: "member", passwordHash: await hashPassword(password) });
  return email;
}

function cookieNamed(res: Response, name: string): string {
  const all = res.headers.getSetCookie().map((c) => c.split(";")[0]);
  const found = all.find((c) => c.startsWith(`${name}=`));
  if (!found) throw new Error(`no ${name} cookie in ${all.join(" | ")}`);
  return found;
}

function apiPost(path: string, init: { cookie?: string; origin?: string; json?: unknown } = {}) {
  const headers = new Headers({ "Content-Type": "application/json" });
  if (init.cookie) headers.set("Cookie", init.cookie);
  if (init.origin) headers.set("Origin", init.origin);
  return new Request(BASE + path, { method: "POST", headers, body: JSON.stringify(init.json ?? {}) });
}

afterEach(() => {
  config.trustProxy = false;
});

describe("sign-in limits", () => {
  test("without a proxy, one client guessing one password on many accounts is refused (the socket address counts)", async () => {
    const client = peer();
    const statuses: number[] = [];
    for (let i = 0; i < LIMITS.signInClient.points + 1; i++) {
      const res = await call(signIn, signInForm(`nobody-${tag()}@demo.ratebook.invalid`, "Winter2026!"), {}, client);
      statuses.push(statusOf(res));
    }
    expect(statuses.slice(0, LIMITS.signInClient.points).every((s) => s === 400)).toBe(true);
    expect(statuses.at(-1)).toBe(429);
    // Another client is not held back.
    const other = await call(signIn, signInForm("student@demo.ratebook.invalid", "demo-student-pass"), {}, peer());
    expect(other.status).toBe(302);
  });

  test("behind the proxy the right-most X-Forwarded-For counts, so a client cannot pick its own address", async () => {
    config.trustProxy = true;
    const proxyAdded = `203.0.113.${Math.floor(Math.random() * 200) + 1}-${tag()}`;
    const statuses: number[] = [];
    for (let i = 0; i < LIMITS.signInClient.points + 1; i++) {
      // The client writes a new address on every try; the proxy appends the one it saw.
      const forwarded = `198.51.100.${i % 250}, ${proxyAdded}`;
      statuses.push(statusOf(await call(signIn, signInForm(`nobody-${tag()}@demo.ratebook.invalid`, "Winter2026!", { forwarded }), {}, "10.0.0.1")));
    }
    expect(statuses.at(-1)).toBe(429);
  });

  test("others' failed guesses do not lock the owner out of a browser that signed in before", async () => {
    const email = await person("owner-password-1");
    const first: Response = await call(signIn, signInForm(email, "owner-password-1"), {}, peer());
    expect(first.status).toBe(302);
    const known = cookieNamed(first, "__ratebook_known");

    // An attacker from many addresses, more failures than any per-account limit allows.
    for (let i = 0; i < LIMITS.signInAccount.points + 5; i++) {
      await call(signIn, signInForm(email, `guess-${i}-xxxx`), {}, peer());
    }
    // A browser new to the account is slowed down (429 with Retry-After) ...
    const fresh = await call(signIn, signInForm(email, "owner-password-1"), {}, peer());
    expect(statusOf(fresh)).toBe(429);
    expect(Number(fresh.init.headers["Retry-After"])).toBeGreaterThan(0);
    // ... but the owner's own browser gets in with the right password.
    const owner: Response = await call(signIn, signInForm(email, "owner-password-1", { cookie: known }), {}, peer());
    expect(owner.status).toBe(302);
  });

  test("a burst of parallel guesses from one client cannot all pass the check", async () => {
    const email = await person("parallel-password-1");
    const client = peer();
    const results = await Promise.all(
      Array.from({ length: LIMITS.signInPair.points * 3 }, (_, i) => call(signIn, signInForm(email, `guess-${i}-xxxx`), {}, client)),
    );
    const let_through = results.filter((r) => statusOf(r) === 400).length;
    expect(let_through).toBe(LIMITS.signInPair.points);
  });
});

describe("password reset requests", () => {
  test("are limited per e-mail with 429, Retry-After and words, the same for known and unknown addresses", async () => {
    for (const email of [await person("reset-limit-1"), `nobody-${tag()}@demo.ratebook.invalid`]) {
      const answers = [];
      for (let i = 0; i < LIMITS.resetAddress.points + 1; i++) answers.push(await call(forgotAction, request("/password/forgot", { form: { email } }), {}, peer()));
      expect(answers.slice(0, -1).map(statusOf)).toEqual(Array(LIMITS.resetAddress.points).fill(200));
      const refused = answers.at(-1);
      expect(statusOf(refused)).toBe(429);
      expect(Number(refused.init.headers["Retry-After"])).toBeGreaterThan(0);
      expect(payloadOf(refused).errors.form).toMatch(/Too many reset requests\. Try again in \d+ minutes?/);
    }
  });

  test("are limited per client address whatever the e-mails", async () => {
    const client = peer();
    const statuses = [];
    for (let i = 0; i < LIMITS.resetClient.points + 1; i++) {
      statuses.push(statusOf(await call(forgotAction, request("/password/forgot", { form: { email: `nobody-${tag()}@demo.ratebook.invalid` } }), {}, client)));
    }
    expect(statuses.at(-1)).toBe(429);
  });
});

describe("API limits and origins", () => {
  test("token creation is limited per person (429 JSON with Retry-After)", async () => {
    const email = await person("token-limit-1");
    const cookie = (await call(signIn, signInForm(email, "token-limit-1"), {}, peer())).headers.get("Set-Cookie")!.split(";")[0];
    const statuses: number[] = [];
    for (let i = 0; i < LIMITS.tokenCreate.points + 1; i++) {
      const res: Response = await call(tokensAction, apiPost("/api/tokens", { cookie, origin: BASE, json: { name: `script ${i}` } }));
      statuses.push(res.status);
      if (res.status === 429) {
        expect(Number(res.headers.get("Retry-After"))).toBeGreaterThan(0);
        expect((await res.json()).error).toMatch(/Too many requests: at most 10 new API tokens per person/);
      }
    }
    expect(statuses.at(-1)).toBe(429);
  });

  test("/api/fit and the upload preview are limited per person", async () => {
    const cookie = await demoCookie("demonstrator");
    let last = 0;
    for (let i = 0; i < LIMITS.fit.points + 1; i++) last = (await call(fitAction, apiPost("/api/fit", { cookie, origin: BASE, json: {} }))).status;
    expect(last).toBe(429);
    const student = await demoCookie("student");
    for (let i = 0; i < LIMITS.preview.points + 1; i++) {
      last = (await call(previewAction, apiPost("/api/groups/999999/preview", { cookie: student, origin: BASE }), { groupId: "999999" })).status;
    }
    expect(last).toBe(429);
  });

  test("/api/fit with a session cookie refuses another site's Origin", async () => {
    const cookie = await demoCookie("instructor");
    const res: Response = await call(fitAction, apiPost("/api/fit", { cookie, origin: "https://elsewhere.example", json: {} }));
    expect(res.status).toBe(403);
    expect((await res.json()).error).toMatch(/A write from https:\/\/elsewhere\.example is refused/);
  });

  test("sign-out refuses another site's Origin and keeps the session", async () => {
    const cookie = await demoCookie("student");
    const req = request("/sign-out", { method: "POST", cookie });
    req.headers.set("Origin", "https://elsewhere.example");
    const res: Response = await call(signOut, req);
    expect(res.status).toBe(403);
    const own = request("/sign-out", { method: "POST", cookie });
    own.headers.set("Origin", BASE);
    expect((await call(signOut, own)).status).toBe(302);
  });

  test("an unknown /api/ path answers 404 JSON for every method", async () => {
    for (const handler of [apiNotFound, apiNotFoundAction]) {
      const res: Response = await call(handler, new Request(`${BASE}/api/no-such-thing`, { method: handler === apiNotFound ? "GET" : "POST" }));
      expect(res.status).toBe(404);
      expect(res.headers.get("Content-Type")).toMatch(/application\/json/);
      expect((await res.json()).error).toMatch(/There is no API path \/api\/no-such-thing/);
    }
  });
});
