// The production server (`npm run serve`, scripts/serve.ts) as an operator runs it behind a
// proxy that terminates HTTPS: page forms from APP_URL's https origin are accepted and a foreign
// origin is still refused; JSON log lines with a request id; nosniff on static files; a 431 that
// answers JSON on /api/ paths; it refuses to start in production without a long secret, and
// accepts a list of secrets for rotation.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import http from "node:http";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { startAppServer, type AppServer } from "./harness";
import { testEnv, TEST_APP_PORT } from "../setup/test-env";

const root = path.resolve(import.meta.dirname, "..", "..");
const PUBLIC = "https://ratebook.test";
const SECRET_A = "first-secret-for-the-rotation-test-0123456789";
const SECRET_B = "second-secret-for-the-rotation-test-9876543210";
let server: AppServer;

beforeAll(async () => {
  server = await startAppServer({ APP_URL: PUBLIC, TRUST_PROXY: "1", SESSION_COOKIE_SECURE: "1", LOG_LEVEL: "info", SESSION_SECRET: SECRET_A });
}, 180_000);
afterAll(() => server?.stop());

/** The sign-in form as the browser sends it through the proxy. */
function signInThroughProxy(base: string, origin: string | null) {
  const headers: Record<string, string> = { "x-forwarded-proto": "https", "x-forwarded-for": "203.0.113.9", "content-type": "application/x-www-form-urlencoded" };
  if (origin) headers.origin = origin;
  return fetch(`${base}/sign-in`, { method: "POST", headers, body: new URLSearchParams({ email: "instructor@demo.ratebook.invalid", password: "demo-instructor-pass" }), redirect: "manual" });
}

function logLines(): Array<Record<string, unknown>> {
  return server
    .output()
    .split("\n")
    .filter((l) => l.startsWith("{"))
    .map((l) => JSON.parse(l) as Record<string, unknown>);
}

describe("behind an HTTPS proxy", () => {
  test("the sign-in form from APP_URL's https origin signs in; the cookie is Secure", async () => {
    const res = await signInThroughProxy(server.url, PUBLIC);
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe("/dashboard");
    const cookie = res.headers.get("set-cookie")!;
    expect(cookie).toMatch(/^__ratebook_session=/);
    expect(cookie).toMatch(/; Secure/i);
    const dashboard = await fetch(`${server.url}/dashboard`, { headers: { cookie: cookie.split(";")[0], "x-forwarded-proto": "https" } });
    expect(dashboard.status).toBe(200);
  });

  test("a foreign origin is refused (400), so is APP_URL's host over http, and nothing signs in", async () => {
    for (const origin of ["https://evil.example", "http://ratebook.test", "https://ratebook.test.evil.example", server.url]) {
      const res = await signInThroughProxy(server.url, origin);
      expect(res.status, origin).toBe(400);
      expect(res.headers.get("set-cookie"), origin).toBeNull();
    }
  });

  test("every answer has a request id, which every log line of that request carries", async () => {
    const res = await fetch(`${server.url}/no-such-page`);
    expect(res.status).toBe(404);
    const id = res.headers.get("x-request-id")!;
    expect(id).toMatch(/^[0-9a-f-]{36}$/);
    expect(await res.text()).toContain(id);
    // a trusted proxy's own id is kept (nginx's $request_id)
    const given = await fetch(`${server.url}/sign-in`, { headers: { "x-request-id": "lb-0123abcd" } });
    expect(given.headers.get("x-request-id")).toBe("lb-0123abcd");
    await expect.poll(() => logLines().some((l) => l.requestId === id), { timeout: 5000 }).toBe(true);
    const mine = logLines().filter((l) => l.requestId === id);
    expect(mine[0]).toMatchObject({ level: 40, requestId: id, res: { statusCode: 404 } });
    expect(typeof mine[0].time).toBe("string");
    // every JSON line written while answering requests names its request
    for (const line of logLines().filter((l) => l.req)) expect(line.requestId).toBeTruthy();
  });

  test("an unexpected error goes through the server error hook: one error line with its request id", async () => {
    const res = await fetch(`${server.url}/sign-in`, { method: "POST", headers: { origin: "::not-a-url", "content-type": "application/x-www-form-urlencoded" }, body: "email=a" });
    expect(res.status).toBe(400);
    const id = res.headers.get("x-request-id");
    await expect.poll(() => logLines().some((l) => l.requestId === id && l.level === 50), { timeout: 5000 }).toBe(true);
    const line = logLines().find((l) => l.requestId === id && l.level === 50)!;
    expect(line).toMatchObject({ msg: "unhandled error while answering a request", method: "POST", path: "/sign-in" });
    expect((line.err as { message: string }).message).toMatch(/origin/);
  });

  test("static files carry nosniff; long-lived assets are immutable", async () => {
    const assets = fs.readdirSync(path.join(root, "build", "client", "assets"));
    const asset = await fetch(`${server.url}/assets/${assets.find((a) => a.endsWith(".js"))}`);
    expect(asset.status).toBe(200);
    expect(asset.headers.get("x-content-type-options")).toBe("nosniff");
    expect(asset.headers.get("cache-control")).toContain("immutable");
    const icon = await fetch(`${server.url}/favicon.svg`);
    expect(icon.status).toBe(200);
    expect(icon.headers.get("x-content-type-options")).toBe("nosniff");
  });

  test("headers too large: 431 with a JSON body on /api/ paths, text elsewhere", async () => {
    const send = (p: string) =>
      new Promise<{ status: number; type: string; body: string }>((resolve, reject) => {
        const req = http.request(`${server.url}${p}`, { headers: { cookie: `big=${"x".repeat(40_000)}` } }, (res) => {
          let body = "";
          res.on("data", (c) => (body += c));
          res.on("end", () => resolve({ status: res.statusCode!, type: String(res.headers["content-type"]), body }));
        });
        req.on("error", reject);
        req.end();
      });
    const api = await send("/api/me");
    expect(api.status).toBe(431);
    expect(api.type).toContain("application/json");
    expect(JSON.parse(api.body).error).toMatch(/headers are too large/);
    const page = await send("/dashboard");
    expect(page.status).toBe(431);
    expect(page.type).toContain("text/plain");
  });
});

describe("the health probe", () => {
  test("503 with the same shape when the database does not answer", async () => {
    const ok = await fetch(`${server.url}/healthz`);
    expect(ok.status).toBe(200);
    expect(await ok.json()).toMatchObject({ ok: true, database: "up", queue: { waiting: expect.any(Number), failed: expect.any(Number) } });
    // a second server whose database is a closed port
    const down = await startAppServer({ PORT: String(TEST_APP_PORT + 1), APP_URL: `http://127.0.0.1:${TEST_APP_PORT + 1}`, DATABASE_URL: "postgres://ratebook@127.0.0.1:1/nowhere" });
    try {
      const res = await fetch(`${down.url}/healthz`);
      expect(res.status).toBe(503);
      expect(await res.json()).toEqual({ ok: false, database: "down", queue: { waiting: null, failed: null } });
    } finally {
      await down.stop();
    }
  }, 120_000);
});

describe("session secrets", () => {
  const serve = (env: Record<string, string | undefined>) =>
    spawnSync(path.join(root, "node_modules", ".bin", "tsx"), ["scripts/serve.ts"], {
      cwd: root,
      encoding: "utf8",
      timeout: 60_000,
      env: { ...process.env, ...testEnv, PORT: String(TEST_APP_PORT + 1), NODE_ENV: "production", ...env },
    });

  test("production refuses to start without SESSION_SECRET, with a short one, or without APP_URL", () => {
    const none = serve({ SESSION_SECRET: "" });
    expect(none.status).toBe(1);
    expect(none.stderr).toMatch(/refuses to start in production[\s\S]*SESSION_SECRET is not set/);
    const short = serve({ SESSION_SECRET: "too-short-secret" });
    expect(short.status).toBe(1);
    expect(short.stderr).toMatch(/shorter than 32 characters/);
    const oneShort = serve({ SESSION_SECRET: `${SECRET_A},short` });
    expect(oneShort.status).toBe(1);
    expect(oneShort.stderr).toMatch(/1 of its 2 secrets is shorter/);
    const noUrl = serve({ APP_URL: "" });
    expect(noUrl.status).toBe(1);
    expect(noUrl.stderr).toMatch(/APP_URL is not set/);
  });

  test("a list rotates: a cookie signed with the old secret still works while it is listed second", async () => {
    const signedIn = await signInThroughProxy(server.url, PUBLIC);
    const oldCookie = signedIn.headers.get("set-cookie")!.split(";")[0];
    await server.stop();
    const dashboard = (s: AppServer, cookie: string) => fetch(`${s.url}/dashboard`, { headers: { cookie }, redirect: "manual" });
    server = await startAppServer({ APP_URL: PUBLIC, TRUST_PROXY: "1", LOG_LEVEL: "info", SESSION_SECRET: `${SECRET_B}, ${SECRET_A}` });
    expect((await dashboard(server, oldCookie)).status).toBe(200);
    // new cookies are signed with the first secret
    const fresh = (await signInThroughProxy(server.url, PUBLIC)).headers.get("set-cookie")!.split(";")[0];
    await server.stop();
    server = await startAppServer({ APP_URL: PUBLIC, TRUST_PROXY: "1", LOG_LEVEL: "info", SESSION_SECRET: SECRET_B });
    expect((await dashboard(server, oldCookie)).status).toBe(302);
    expect((await dashboard(server, fresh)).status).toBe(200);
  }, 180_000);
});
