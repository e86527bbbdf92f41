// Reuse walked by clicking from the dashboard in Debian's chromium (issue 18): the instructor
// copies the demo practical (its page -> "Copy this practical" -> the copy's page), downloads the
// bench assignment the technicians get, and copies the demo course to a new term. Screenshots at
// 1280 and 390 px. The copies are removed afterwards so other suites see the demo as seeded.
import fs from "node:fs";
import path from "node:path";
import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, Page } from "playwright-core";
import { signIn, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { Course } from "~/.server/db/models.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { doubledWords } from "~/lib/words";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;
let demoCourse: Course;
let demo: LabSession;
const madeSessions: number[] = [];
const madeCourses: number[] = [];

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  ({ server, browser } = await startBrowserApp());
  demoCourse = (await Course.findOne({ where: { code: "KIN-DEMO" } }))!;
  demo = (await LabSession.findOne({ where: { courseId: demoCourse.id }, order: [["id", "ASC"]] }))!;
}, 180_000);

afterAll(async () => {
  for (const id of madeSessions) await LabSession.destroy({ where: { id } });
  for (const id of madeCourses) await Course.destroy({ where: { id } });
  await stopBrowserApp(server, browser);
  await closeSequelize();
});

async function instructorAt(width: number): Promise<Page> {
  const page = await browser.newPage({ viewport: { width, height: 900 }, acceptDownloads: true });
  page.setDefaultTimeout(15_000);
  await page.goto(`${server.url}/sign-in`);
  await signIn(page, "instructor@demo.ratebook.invalid", "demo-instructor-pass");
  await page.waitForURL(`${server.url}/dashboard`);
  // after a copy to a new term two courses carry the code: click the demo course's own link
  await page.locator(`a[href="/courses/${demoCourse.id}"]`).first().click();
  await page.waitForURL(`${server.url}/courses/${demoCourse.id}`);
  return page;
}

const overflow = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
const headings = (page: Page) => page.locator("h1, h2, th").allTextContents();

describe("reuse", () => {
  test("copy the practical from its page: the copy has its benches, no groups, and says what comes next", async () => {
    for (const width of [1280, 390]) {
      const page = await instructorAt(width);
      await page.getByRole("link", { name: demo.title, exact: true }).click();
      await page.waitForURL(`${server.url}/sessions/${demo.id}`);
      await page.getByRole("link", { name: "Copy this practical" }).click();
      await page.waitForURL(`${server.url}/sessions/${demo.id}/copy`);
      expect(doubledWords((await headings(page)).join("\n"))).toEqual([]);
      expect(await overflow(page)).toBe(0);
      await page.screenshot({ path: path.join(shots, `copy-practical-${width}.png`), fullPage: true });
      await page.getByLabel("Title").fill(`${demo.title} (copy at ${width} px)`);
      await page.getByLabel("Lab day").fill("2027-06-01");
      await page.getByRole("button", { name: "Make the copy" }).click();
      await page.waitForURL(/\/sessions\/\d+\?copied=/);
      const id = Number(/\/sessions\/(\d+)/.exec(page.url())![1]);
      madeSessions.push(id);
      await expect.poll(() => page.getByText(/This is the copy/).count()).toBe(1);
      expect(await Bench.count({ where: { sessionId: id } })).toBe(await Bench.count({ where: { sessionId: demo.id } }));
      expect(await Bench.count({ where: { sessionId: id, groupId: null } })).toBe(await Bench.count({ where: { sessionId: id } }));
      expect(await overflow(page)).toBe(0);
      await page.screenshot({ path: path.join(shots, `copied-practical-${width}.png`), fullPage: true });
      // the trail leads back to the course
      await page.getByRole("navigation", { name: "You are here" }).getByRole("link", { name: "KIN-DEMO" }).click();
      await page.waitForURL(`${server.url}/courses/${demoCourse.id}`);
      await page.close();
    }
  });

  test("the bench assignment downloads from the practical's page as a workbook with every bench", async () => {
    const page = await instructorAt(1280);
    await page.getByRole("link", { name: demo.title, exact: true }).click();
    await page.waitForURL(`${server.url}/sessions/${demo.id}`);
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Bench assignment (.xlsx)" }).click()]);
    expect(download.suggestedFilename()).toMatch(/benches.*\.xlsx$/);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile((await download.path())!);
    const ws = wb.getWorksheet("Benches")!;
    expect(ws.actualRowCount - 1).toBe(await Bench.count({ where: { sessionId: demo.id } }));
    await page.close();
  });

  test("copy the course to a new term from its page", async () => {
    for (const width of [1280, 390]) {
      const page = await instructorAt(width);
      await page.getByRole("link", { name: "Copy to a new term" }).click();
      await page.waitForURL(`${server.url}/courses/${demoCourse.id}/copy`);
      expect(await overflow(page)).toBe(0);
      await page.screenshot({ path: path.join(shots, `copy-course-${width}.png`), fullPage: true });
      await page.getByLabel("New term").fill(`Copy test ${width}`);
      await page.getByRole("button", { name: "Make the new course" }).click();
      await page.waitForURL((u) => /\/courses\/\d+$/.test(u.pathname) && !u.pathname.endsWith(`/${demoCourse.id}`));
      const id = Number(/\/courses\/(\d+)$/.exec(new URL(page.url()).pathname)![1]);
      madeCourses.push(id);
      expect(await LabSession.count({ where: { courseId: id } })).toBe(await LabSession.count({ where: { courseId: demoCourse.id } }));
      await expect.poll(() => page.getByText(`Copy test ${width}`).count()).toBeGreaterThan(0);
      await page.screenshot({ path: path.join(shots, `copied-course-${width}.png`), fullPage: true });
      await page.close();
    }
  });
});
