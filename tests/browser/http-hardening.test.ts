// Against the built server over HTTP: security headers on every kind of answer, a CSP nonce on
// every script the framework writes (and the page still hydrates with no violation), and a
// chunked body past the limit refused with 413 while it is still being sent.
import http from "node:http";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser } from "playwright-core";
import { signIn, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { demoCookie } from "../integration/helpers";

let server: AppServer;
let browser: Browser;

beforeAll(async () => {
  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
});

function expectCommonHeaders(res: Response) {
  expect(res.headers.get("x-frame-options")).toBe("DENY");
  expect(res.headers.get("x-content-type-options")).toBe("nosniff");
  expect(res.headers.get("referrer-policy")).toBe("same-origin");
  expect(res.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
  expect(res.headers.get("cache-control")).toBe("no-store");
}

describe("security headers", () => {
  test("a page: CSP with a fresh nonce that every script carries, and no other inline script", async () => {
    const a = await fetch(`${server.url}/sign-in`);
    const b = await fetch(`${server.url}/sign-in`);
    expectCommonHeaders(a);
    const csp = a.headers.get("content-security-policy")!;
    const nonce = /'nonce-([A-Za-z0-9+/=]+)'/.exec(csp)?.[1];
    expect(nonce).toBeTruthy();
    expect(csp).toMatch(/script-src 'self' 'nonce-/);
    expect(csp).not.toContain("unsafe-inline");
    expect(b.headers.get("content-security-policy")).not.toContain(nonce!);
    const html = await a.text();
    const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
    expect(scripts.length).toBeGreaterThan(0);
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`);
  });

  test("signed-in pages, redirects, the JSON API and 404s get them too", async () => {
    const cookie = await demoCookie("instructor");
    const page = await fetch(`${server.url}/dashboard`, { headers: { cookie } });
    expect(page.status).toBe(200);
    expectCommonHeaders(page);
    const redirect = await fetch(`${server.url}/dashboard`, { redirect: "manual" });
    expect(redirect.status).toBe(302);
    expectCommonHeaders(redirect);
    const api = await fetch(`${server.url}/api/me`, { headers: { cookie } });
    expect(api.status).toBe(200);
    expectCommonHeaders(api);
    expect(api.headers.get("content-security-policy")).toContain("default-src 'none'");
    const missing = await fetch(`${server.url}/no-such-page`);
    expect(missing.status).toBe(404);
    expectCommonHeaders(missing);
  });

  test("in the browser the page hydrates and signs in with no CSP violation", async () => {
    const page = await browser.newPage();
    const violations: string[] = [];
    page.on("console", (m) => {
      if (/Content Security Policy|Refused to/.test(m.text())) violations.push(m.text());
    });
    await page.goto(`${server.url}/sign-in`);
    await page.evaluate(() => document.addEventListener("securitypolicyviolation", (e) => console.error(`Refused to: ${e.violatedDirective} ${e.blockedURI}`)));
    await signIn(page, "instructor@demo.ratebook.invalid", "demo-instructor-pass");
    await page.waitForURL(`${server.url}/dashboard`);
    // A client-side navigation only works once the app has hydrated.
    await page.getByRole("link", { name: "Check a data set" }).click();
    await page.waitForURL(`${server.url}/fit-check`);
    await page.getByRole("button", { name: "Fill in an invented example" }).click();
    await page.getByRole("button", { name: "Fit", exact: true }).click();
    await expect.poll(() => page.getByRole("heading", { name: "Result" }).count(), { timeout: 10_000 }).toBe(1);
    expect(violations).toEqual([]);
    await page.close();
  });
});

describe("bounded bodies over the wire", () => {
  test("a chunked 20 MiB POST to /api/fit gets 413 while it is still being sent", async () => {
    const cookie = await demoCookie("instructor");
    const { port } = new URL(server.url);
    const MiB = 1024 * 1024;
    const chunk = Buffer.alloc(MiB, 0x20);
    let sent = 0;
    let answered = 0;
    const status = await new Promise<number>((resolve, reject) => {
      const req = http.request({ host: "127.0.0.1", port, path: "/api/fit", method: "POST", headers: { cookie, "content-type": "application/json", "transfer-encoding": "chunked" } }, (res) => {
        answered = res.statusCode ?? 0;
        resolve(answered);
        res.resume();
        req.destroy();
      });
      req.on("error", (e) => (answered ? undefined : reject(e)));
      const pump = () => {
        while (!answered && sent < 20 * MiB) {
          sent += MiB;
          if (!req.write(chunk)) return void req.once("drain", pump);
        }
        if (!answered) req.end();
      };
      pump();
    });
    expect(status).toBe(413);
    expect(sent).toBeLessThan(20 * MiB);
  });
});
