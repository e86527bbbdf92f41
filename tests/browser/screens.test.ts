// Every page in tests/access/table.ts that lists `screens`, as each listed visitor: at 390 px wide
// the page must not scroll sideways (a screenshot of each lands in test-results/390/), and
// axe-core must find no serious or critical violation. The data-set check is also checked with a
// result on screen (plots: text at least 11 px, axis labels inside the plot), and sign-in and the
// data-set check are used by keyboard alone.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser } from "playwright-core";
import { contextWithCookie, horizontalOverflow, seriousAxeViolations, smallestPlotText, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { signInAs } from "../integration/helpers";
import { ACCESS, SIGN_INS, fillUrl, makeFixtures, type Visitor } from "../access/table";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results", "390");
const PHONE = { width: 390, height: 844 };
let server: AppServer;
let browser: Browser;
let fixtures: Record<string, string>;
const cookies: Partial<Record<Visitor, string>> = {};

async function cookieFor(who: Visitor) {
  if (who === "signedOut") return null;
  cookies[who] ??= await signInAs(SIGN_INS[who].email, SIGN_INS[who].password);
  return cookies[who]!;
}

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  fixtures = await makeFixtures();
  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
});

describe("every page at 390 px, and axe-core", () => {
  test("no sideways scrolling and no serious or critical accessibility violation", async () => {
    const problems: string[] = [];
    let visited = 0;
    for (const [file, entry] of Object.entries(ACCESS)) {
      for (const who of entry.screens ?? []) {
        const context = await contextWithCookie(browser, server.url, await cookieFor(who), PHONE);
        const page = await context.newPage();
        const url = fillUrl(entry.url, fixtures);
        await page.goto(server.url + url, { waitUntil: "networkidle" });
        const name = `${file.replace(/^routes\//, "").replace(/\.tsx?$/, "").replace(/\//g, "-")}-${who}`;
        await page.screenshot({ path: path.join(shots, `${name}.png`), fullPage: true });
        const overflow = await horizontalOverflow(page);
        if (overflow > 0) problems.push(`${url} as ${who}: ${overflow} px sideways overflow at 390 px`);
        for (const v of await seriousAxeViolations(page)) problems.push(`${url} as ${who}: ${v}`);
        visited++;
        await context.close();
      }
    }
    expect(visited).toBeGreaterThan(10);
    expect(problems).toEqual([]);
  }, 240_000);

  test("the data-set check with a result: no overflow at 390 px, plot text at least 11 px, labels inside the plots", async () => {
    for (const viewport of [PHONE, { width: 1280, height: 900 }]) {
      const context = await contextWithCookie(browser, server.url, await cookieFor("instructor"), viewport);
      const page = await context.newPage();
      await page.goto(`${server.url}/fit-check`, { waitUntil: "networkidle" });
      await page.getByRole("button", { name: "Fill in an invented example" }).click();
      await page.getByRole("button", { name: "Fit", exact: true }).click();
      await expect.poll(() => page.getByRole("heading", { name: "Result" }).count(), { timeout: 10_000 }).toBe(1);
      await page.screenshot({ path: path.join(shots, `fit-check-result-${viewport.width}.png`), fullPage: true });
      expect(await horizontalOverflow(page)).toBeLessThanOrEqual(0);
      expect(await smallestPlotText(page)).toBeGreaterThanOrEqual(11);
      const outside = await page.evaluate(() =>
        [...document.querySelectorAll("svg")].flatMap((svg) => {
          const box = svg.getBoundingClientRect();
          return [...svg.querySelectorAll("text")]
            .map((t) => ({ t: t.textContent, r: t.getBoundingClientRect() }))
            .filter(({ r }) => r.left < box.left - 0.5 || r.right > box.right + 0.5 || r.top < box.top - 0.5 || r.bottom > box.bottom + 0.5)
            .map(({ t }) => t);
        }),
      );
      expect(outside).toEqual([]);
      expect(await seriousAxeViolations(page)).toEqual([]);
      await context.close();
    }
  }, 60_000);
});

describe("keyboard alone", () => {
  async function tabTo(page: import("playwright-core").Page, accessibleName: RegExp, max = 40) {
    for (let i = 0; i < max; i++) {
      await page.keyboard.press("Tab");
      const name = await page.evaluate(() => {
        const el = document.activeElement as HTMLElement | null;
        if (!el) return "";
        const id = el.getAttribute("id");
        const label = id ? document.querySelector(`label[for="${id}"]`)?.textContent : null;
        return label ?? el.getAttribute("aria-label") ?? el.textContent ?? "";
      });
      if (accessibleName.test(name.trim())) return;
    }
    throw new Error(`Tab never reached ${accessibleName}`);
  }

  test("sign in, then check a data set, without the mouse", async () => {
    const context = await contextWithCookie(browser, server.url, null);
    const page = await context.newPage();
    await page.goto(`${server.url}/sign-in?returnTo=%2Ffit-check`, { waitUntil: "networkidle" });
    await tabTo(page, /^E-mail$/);
    await page.keyboard.type("demonstrator@demo.ratebook.invalid");
    await tabTo(page, /^Password$/);
    await page.keyboard.type("demo-demonstrator-pass");
    await page.keyboard.press("Enter");
    await page.waitForURL(`${server.url}/fit-check`);
    await page.waitForLoadState("networkidle");
    // Keys do nothing on a button whose page has not hydrated yet: wait for the route's module.
    await page.waitForFunction(() => Boolean((window as unknown as { __reactRouterRouteModules?: Record<string, unknown> }).__reactRouterRouteModules?.["routes/tools/fit-check"]));
    await tabTo(page, /Fill in an invented example/);
    await page.keyboard.press("Enter");
    await expect.poll(() => page.getByLabel("CA0").inputValue(), { timeout: 5_000 }).not.toBe("");
    await tabTo(page, /^Fit$/, 80);
    await page.keyboard.press("Enter");
    await expect.poll(() => page.getByRole("heading", { name: "Result" }).count(), { timeout: 10_000 }).toBe(1);
    await context.close();
  });
});
