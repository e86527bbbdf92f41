// The course page in the browser: the invitation form comes back empty after "Invitation sent"
// (a second click cannot silently re-send), and a role change says so beside its row, which
// stays where it was. The account page lists where one is signed in.
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser } from "playwright-core";
import { contextWithCookie, seriousAxeViolations, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { call, demoCookie, request } from "../integration/helpers";
import { action as newCourseAction } from "~/routes/courses/new";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;

beforeAll(async () => {
  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
});

describe("course page", () => {
  test("the invite form clears after sending; a role change is confirmed beside a row that stays put", async () => {
    const cookie = await demoCookie("instructor");
    const created = await call(newCourseAction, request("/courses/new", { cookie, form: { code: "BROWSER-PEOPLE", title: "Browser people test", term: "Browser term" } }));
    const url = `${server.url}${created.headers.get("Location")}`;
    const context = await contextWithCookie(browser, server.url, cookie);
    const page = await context.newPage();
    await page.goto(url, { waitUntil: "networkidle" });

    for (const [email, name] of [["browser-ann@demo.ratebook.invalid", "Ann Browser (test)"], ["browser-bo@demo.ratebook.invalid", "Bo Browser (test)"]]) {
      await page.getByLabel("E-mail").fill(email);
      await page.getByLabel("Name", { exact: true }).fill(name);
      await page.getByRole("button", { name: "Add and invite" }).click();
      await expect.poll(() => page.getByText(`Invitation sent to ${email}.`).count()).toBe(1);
      expect(await page.getByLabel("E-mail").inputValue()).toBe("");
      expect(await page.getByLabel("Name", { exact: true }).inputValue()).toBe("");
    }

    const rowNames = () => page.locator("section[aria-labelledby=members-h] tbody tr td:first-child").allTextContents();
    await expect.poll(async () => (await rowNames()).length).toBe(3);
    const before = await rowNames();
    await page.getByLabel("Role of Ann Browser (test)").selectOption("demonstrator");
    const row = page.locator("tr", { has: page.getByLabel("Role of Ann Browser (test)") });
    await expect.poll(() => row.getByRole("status").textContent()).toContain("Saved: now demonstrator");
    await page.waitForLoadState("networkidle");
    expect(await rowNames()).toEqual(before);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.screenshot({ path: path.join(shots, "course-people-saved.png"), fullPage: true });
    await context.close();
  });

  test("the account page lists this browser's session", async () => {
    const context = await contextWithCookie(browser, server.url, await demoCookie("demonstrator"));
    const page = await context.newPage();
    await page.goto(`${server.url}/account`, { waitUntil: "networkidle" });
    expect(await page.getByText("this browser").count()).toBeGreaterThanOrEqual(1);
    expect(await page.getByRole("button", { name: "Sign out here" }).count()).toBe(1);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await context.close();
  });
});
