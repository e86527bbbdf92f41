// End to end in Debian's chromium: "Sign in with your institution" on the sign-in page, the fake
// institution's own sign-in page (a real OpenID provider on loopback, started by the global
// setup), back on the dashboard; sign-out ends the session; an unknown person meets the page
// that says so.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser } from "playwright-core";
import { CHROMIUM_PATH, seriousAxeViolations, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { testEnv } from "../setup/test-env";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;

beforeAll(async () => {
  if (!fs.existsSync(CHROMIUM_PATH)) throw new Error(`Chromium not found at ${CHROMIUM_PATH}. Install Debian's package: apt-get install -y chromium.`);
  fs.mkdirSync(shots, { recursive: true });
  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
});

describe("browser: sign in with the institution", () => {
  test("from the sign-in page through the fake institution to the dashboard, and out again", async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 }, bypassCSP: true });
    await page.goto(`${server.url}/sign-in`);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.getByRole("link", { name: "Sign in with your institution" }).click();

    // The fake institution's page, on its own origin.
    await page.waitForURL((url) => url.href.startsWith(`${testEnv.OIDC_ISSUER}/interaction/`));
    await page.getByLabel("Username").fill("rowan");
    await page.getByLabel("Password").fill("institution-pass");
    await page.getByRole("button", { name: "Continue" }).click();

    await page.waitForURL(`${server.url}/dashboard`);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Hello, Dr Rowan Vale (demo instructor)");
    await page.screenshot({ path: path.join(shots, "sso-dashboard.png") });

    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(`${server.url}/sign-in`);
    await page.goto(`${server.url}/dashboard`);
    await expect.poll(() => new URL(page.url()).pathname).toBe("/sign-in");
    await page.close();
  });

  test("a person the institution knows and Ratebook does not gets a clear page", async () => {
    const page = await browser.newPage({ viewport: { width: 390, height: 800 }, bypassCSP: true });
    await page.goto(`${server.url}/sign-in`);
    await page.getByRole("link", { name: "Sign in with your institution" }).click();
    await page.waitForURL((url) => url.href.startsWith(`${testEnv.OIDC_ISSUER}/interaction/`));
    await page.getByLabel("Username").fill("visitor");
    await page.getByLabel("Password").fill("institution-pass");
    await page.getByRole("button", { name: "Continue" }).click();
    await page.waitForURL((url) => url.pathname === "/sign-in/institution/return");
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("No Ratebook account");
    expect(await page.getByRole("alert").textContent()).toContain("Ratebook has no account for visitor@fake-institution.invalid");
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.screenshot({ path: path.join(shots, "sso-unknown-person.png") });
    await page.close();
  });
});
