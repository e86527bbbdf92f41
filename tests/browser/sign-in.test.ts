// End to end in Debian's chromium: sign in as the demo instructor and see the dashboard;
// a student meets the 403 page on an instructor page.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser } from "playwright-core";
import { CHROMIUM_PATH, seriousAxeViolations, signIn, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;

beforeAll(async () => {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(`Chromium not found at ${CHROMIUM_PATH}. Install Debian's package: apt-get install -y chromium (npm test does this when run as root).`);
  }
  fs.mkdirSync(shots, { recursive: true });
  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
});

describe("browser", () => {
  test("the demo instructor signs in and sees the dashboard", async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 }, bypassCSP: true });
    const offHost: string[] = [];
    page.on("request", (r) => {
      if (!r.url().startsWith(server.url) && !r.url().startsWith("data:")) offHost.push(r.url());
    });
    await page.goto(`${server.url}/dashboard`);
    await expect.poll(() => new URL(page.url()).pathname).toBe("/sign-in");
    expect(new URL(page.url()).searchParams.get("returnTo")).toBe("/dashboard");

    await signIn(page, "instructor@demo.ratebook.invalid", "wrong-password");
    await expect.poll(() => page.getByRole("alert").first().textContent()).toContain("do not match an account");
    expect(await page.getByLabel("E-mail").inputValue()).toBe("instructor@demo.ratebook.invalid");
    await page.screenshot({ path: path.join(shots, "sign-in-error.png") });
    expect(await seriousAxeViolations(page)).toEqual([]);

    await page.getByLabel("Password").fill("demo-instructor-pass");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(`${server.url}/dashboard`);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Hello, Dr Rowan Vale (demo instructor)");
    expect(await page.getByRole("link", { name: "KIN-DEMO" }).count()).toBe(1);
    expect(await page.locator("header").textContent()).toContain("course creator");
    expect(await page.getByRole("navigation", { name: "Main" }).textContent()).toContain("New course");
    // The font ships with the app: it is loaded, and no request left the app's own host.
    const fontLoaded = await page.evaluate(async () => {
      await document.fonts.ready;
      return document.fonts.check('16px "Atkinson Hyperlegible"') && [...document.fonts].some((f) => f.family.includes("Atkinson") && f.status === "loaded");
    });
    expect(fontLoaded).toBe(true);
    expect(offHost).toEqual([]);
    await page.screenshot({ path: path.join(shots, "dashboard-instructor.png"), fullPage: true });

    await page.getByRole("link", { name: "KIN-DEMO" }).click();
    await page.waitForURL(/\/courses\/\d+$/);
    await expect.poll(() => page.getByRole("heading", { name: "Add a person" }).count()).toBe(1);
    // The only instructor cannot demote themself: the refusal shows and the saved role comes back.
    const mine = page.getByLabel("Role of Dr Rowan Vale (demo instructor)");
    await mine.selectOption("student");
    await expect.poll(() => page.getByText("A course needs at least one instructor", { exact: false }).count()).toBe(1);
    await expect.poll(() => mine.inputValue()).toBe("instructor");
    await page.screenshot({ path: path.join(shots, "course-instructor.png"), fullPage: true });
    expect(await seriousAxeViolations(page)).toEqual([]);

    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(`${server.url}/sign-in`);
    await page.close();
  });

  test("a student sees the 403 page on an instructor page", async () => {
    const page = await browser.newPage();
    await page.goto(`${server.url}/sign-in`);
    await signIn(page, "student@demo.ratebook.invalid", "demo-student-pass");
    await page.waitForURL(`${server.url}/dashboard`);
    const res = await page.goto(`${server.url}/courses/new`);
    expect(res?.status()).toBe(403);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Not allowed");
    // The header stays, so the student can move on; the student's menu has no instructor items.
    expect(await page.getByRole("navigation", { name: "Main" }).textContent()).toBe("Dashboard");
    await page.screenshot({ path: path.join(shots, "forbidden-student.png") });
    const missing = await page.goto(`${server.url}/no-such-page`);
    expect(missing?.status()).toBe(404);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Page not found");
    await page.close();
  });
});
