// Class results and the live dashboard in Debian's chromium, on a small invented practical made
// here (so the demo data stay as they are): the instructor sees the class Arrhenius plot (points,
// fitted and reference lines, Ea), leaves the bench with a unit slip out of the fit and puts it
// back; the dashboard's figures change without a reload when a group uploads, and the polling
// stops while the tab is hidden. Screenshots at 1280 and 390 px in test-results/.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, Page } from "playwright-core";
import { contextWithCookie, horizontalOverflow, seriousAxeViolations, smallestPlotText, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { makePractical, type Practical } from "../integration/practical-fixture";
import { createSubmission } from "~/.server/submissions/service.server";
import { markSubmission } from "~/.server/submissions/marking.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { runCsv, simulateRun, type Mistake } from "~/lib/marking/simulate";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;
let p: Practical;
let staff: string;

async function upload(g: number, mistake: Mistake = "none", mark = true) {
  const bench = p.benches[g];
  const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: 16, seed: 500 + g, mistake });
  const bytes = new TextEncoder().encode(runCsv(run));
  const created = await createSubmission(p.students[g], p.groups[g].id, { bytes, name: "invented-run.csv", type: "text/csv", size: bytes.byteLength },
    { sessionId: String(p.session.id), measured: "concentrationA", reportedK: String(run.reportedK), reportedMethod: run.reportedMethod }, true);
  if (mark) await markSubmission(created.id);
  return created.id;
}

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  p = await makePractical("CLASS-B", { groups: 5 });
  // four groups in: three good runs and one with minutes written as seconds (k 60 times off)
  await upload(0);
  await upload(1);
  await upload(2);
  await upload(3, "minutes-as-seconds");
  staff = await p.cookie(p.instructor);
  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
  await p?.course.destroy();
  await closeSequelize();
});

async function open(url: string, width = 1280): Promise<Page> {
  const context = await contextWithCookie(browser, server.url, staff, { width, height: 900 });
  const page = await context.newPage();
  await page.goto(server.url + url);
  return page;
}

const plot = (page: Page) => page.getByRole("img", { name: "Class Arrhenius plot: ln k against 1/T" });

describe("class results in the browser", () => {
  test("the class Arrhenius plot with its points, both lines and Ea; a bench left out and put back", async () => {
    const page = await open(`/sessions/${p.session.id}/class-results`);
    const svg = plot(page);
    expect(await svg.count()).toBe(1);
    expect(await svg.locator("circle[data-series=points]").count()).toBe(4);
    expect(await svg.locator("path[data-series=curve]").count()).toBe(1);
    expect(await svg.locator("path[data-series=dashed]").count()).toBe(1);
    expect(await page.getByTestId("fit-ea").textContent()).toMatch(/^[\d.]+ \(95 % CI −?[\d.]+ to [\d.]+\) kJ\/mol$/);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.screenshot({ path: path.join(shots, "class-results-1280.png"), fullPage: true });

    // leave out the bench with the unit slip; a reason is required
    await page.getByLabel("Bench", { exact: true }).selectOption({ label: `Bench ${p.benches[3].label} (G4, 40 °C)` });
    await page.getByRole("button", { name: "Leave out of the fit" }).click();
    await expect.poll(() => page.getByText("Give a reason: it is shown beside the bench and kept in the audit log.").count()).toBe(1);
    await page.getByLabel(/^Reason/).fill("Times were written in minutes as seconds (invented).");
    await page.getByRole("button", { name: "Leave out of the fit" }).click();
    await expect.poll(() => page.getByText(/is left out of the class fit/).count()).toBe(1);
    // the action's answer comes first, then the page's data again
    await expect.poll(() => svg.locator("circle[data-series=points]").count()).toBe(3);
    expect(await svg.locator("path[data-series=crosses]").count()).toBe(1);
    expect(await page.locator("section[aria-labelledby=left-out-h]").textContent()).toContain("Times were written in minutes as seconds (invented).");
    expect(await page.getByTestId("fit-ea").textContent()).toMatch(/kJ\/mol$/);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.screenshot({ path: path.join(shots, "class-results-excluded-1280.png"), fullPage: true });

    // at 390 px: no sideways scrolling, plot text at least 11 px
    await page.setViewportSize({ width: 390, height: 844 });
    await page.reload();
    await expect.poll(() => horizontalOverflow(page)).toBeLessThanOrEqual(0);
    // the plot is drawn again at its shown width once the page is hydrated
    await expect.poll(() => smallestPlotText(page), { timeout: 10_000 }).toBeGreaterThanOrEqual(11);
    await page.screenshot({ path: path.join(shots, "class-results-390.png"), fullPage: true });

    await page.getByRole("button", { name: `Put back bench ${p.benches[3].label} into the fit` }).click();
    await expect.poll(() => page.getByText(/is back in the class fit/).count()).toBe(1);
    await expect.poll(() => svg.locator("circle[data-series=points]").count()).toBe(4);
    expect(await svg.locator("path[data-series=crosses]").count()).toBe(0);
    await page.context().close();
  });
});

describe("live dashboard in the browser", () => {
  test("figures change without a reload after an upload; no polling while the tab is hidden", async () => {
    const page = await open("/dashboard");
    const polls: number[] = [];
    page.on("request", (r) => {
      if (new URL(r.url()).pathname.startsWith("/dashboard/live")) polls.push(Date.now());
    });
    const row = page.locator(`li[data-practical="${p.session.id}"]`);
    expect(await row.locator("[data-figure=versions]").textContent()).toBe("4");
    expect(await row.locator("[data-figure=uploaded]").textContent()).toBe("4 of 5");
    expect(await seriousAxeViolations(page)).toEqual([]);
    // a marker that a full page load would wipe out
    await page.evaluate(() => ((window as unknown as { keptAcrossPolls: boolean }).keptAcrossPolls = true));

    await upload(4, "none", false);
    await expect.poll(() => row.locator("[data-figure=versions]").textContent(), { timeout: 15_000 }).toBe("5");
    expect(await row.locator("[data-figure=uploaded]").textContent()).toBe("5 of 5");
    expect(await row.locator("[data-figure=being-marked]").textContent()).toBe("1");
    expect(await page.evaluate(() => (window as unknown as { keptAcrossPolls?: boolean }).keptAcrossPolls)).toBe(true);
    expect(polls.length).toBeGreaterThan(0);
    await page.screenshot({ path: path.join(shots, "dashboard-live-1280.png"), fullPage: true });

    // the tab is hidden: no request for longer than two polling periods
    await page.evaluate(() => {
      Object.defineProperty(document, "visibilityState", { configurable: true, get: () => "hidden" });
      document.dispatchEvent(new Event("visibilitychange"));
    });
    await page.waitForTimeout(500); // a request already under way may finish
    const whileHidden = polls.length;
    await page.waitForTimeout(11_000);
    expect(polls.length).toBe(whileHidden);

    // shown again: it asks at once and goes on polling
    await page.evaluate(() => {
      Object.defineProperty(document, "visibilityState", { configurable: true, get: () => "visible" });
      document.dispatchEvent(new Event("visibilitychange"));
    });
    await expect.poll(() => polls.length, { timeout: 2_000 }).toBeGreaterThan(whileHidden);
    expect(await page.evaluate(() => (window as unknown as { keptAcrossPolls?: boolean }).keptAcrossPolls)).toBe(true);

    await page.setViewportSize({ width: 390, height: 844 });
    await expect.poll(() => horizontalOverflow(page)).toBeLessThanOrEqual(0);
    await page.screenshot({ path: path.join(shots, "dashboard-live-390.png"), fullPage: true });
    await page.context().close();
  }, 60_000);
});
