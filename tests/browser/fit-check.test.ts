// The "check a data set" page in Debian's chromium: invented example in, k with its interval out;
// bad input gets messages beside the fields that hold it.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, Page } from "playwright-core";
import { seriousAxeViolations, signIn, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;
let page: Page;

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  ({ server, browser } = await startBrowserApp());
  // bypassCSP so axe-core can be injected (tests/browser/harness.ts).
  page = await browser.newPage({ viewport: { width: 1280, height: 900 }, bypassCSP: true });
  await page.goto(`${server.url}/sign-in?returnTo=%2Ffit-check`);
  await signIn(page, "instructor@demo.ratebook.invalid", "demo-instructor-pass");
  await page.waitForURL(`${server.url}/fit-check`);
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
});

describe("check a data set", () => {
  test("the invented example fits: unequal-feed model, k with a 95 % interval, reference comparison, plots", async () => {
    await page.getByRole("button", { name: "Fill in an invented example" }).click();
    await page.getByRole("button", { name: "Fit", exact: true }).click();
    await expect.poll(() => page.getByRole("heading", { name: "Result" }).count(), { timeout: 10_000 }).toBe(1);
    const report = (await page.locator("section[aria-labelledby=result-h]").textContent()) ?? "";
    expect(report).toContain("first order in A and B, unequal feed");
    expect(report).toMatch(/k, (weighted straight-line|curve) fit \(used for marking\)[\d.]+ \(95 % CI [\d.]+ to [\d.]+\) L\/\(mol·s\)/);
    expect(report).toMatch(/Within tolerance|Outside tolerance/);
    expect(await page.getByRole("img", { name: "Readings against time with the fitted model" }).count()).toBe(1);
    await page.screenshot({ path: path.join(shots, "fit-check-result.png"), fullPage: true });
    expect(await seriousAxeViolations(page)).toEqual([]);
  });

  test("bad input is named beside its field, with the pasted line", async () => {
    await page.getByLabel("CA0").fill("");
    await page.getByRole("textbox", { name: /Readings/ }).fill("time,value\n0,2.1\n2,abc\n4,1.9\n6,1.8");
    await page.getByRole("button", { name: "Fit", exact: true }).click();
    await expect.poll(() => page.getByText("Enter the initial concentration of A.").count()).toBe(1);
    expect(await page.getByText('Line 3, column 2 (value): "abc" is not a number.').count()).toBe(1);
    await page.screenshot({ path: path.join(shots, "fit-check-errors.png") });
    expect(await seriousAxeViolations(page)).toEqual([]);
  });
});
