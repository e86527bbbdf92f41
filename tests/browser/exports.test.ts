// The gradebook downloads in Debian's chromium, on a small invented practical made here: the
// instructor finds the links on the practical's page, the course page and both gradebook pages,
// clicks them, and the browser saves a workbook exceljs can open (with the marks, the fit and the
// readings sheets) and a CSV with its byte-order mark, each named after the course and the date.
// Screenshots of those pages at 1280 and 390 px in test-results/exports-*.png.
import fs from "node:fs";
import path from "node:path";
import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, Page } from "playwright-core";
import { contextWithCookie, horizontalOverflow, seriousAxeViolations, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { makePractical, type Practical } from "../integration/practical-fixture";
import { createSubmission } from "~/.server/submissions/service.server";
import { markSubmission } from "~/.server/submissions/marking.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { runCsv, simulateRun } from "~/lib/marking/simulate";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
const today = new Date().toISOString().slice(0, 10);
let server: AppServer;
let browser: Browser;
let p: Practical;
let staff: string;

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  p = await makePractical("EXP-B", { groups: 2 });
  const bench = p.benches[0];
  const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: 16, seed: 77 });
  const bytes = new TextEncoder().encode(runCsv(run));
  const created = await createSubmission(p.students[0], p.groups[0].id, { bytes, name: "invented-run.csv", type: "text/csv", size: bytes.byteLength },
    { sessionId: String(p.session.id), measured: "concentrationA", reportedK: String(run.reportedK), reportedMethod: run.reportedMethod }, true);
  await markSubmission(created.id);
  staff = await p.cookie(p.instructor);
  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
  await p?.course.destroy();
  await closeSequelize();
});

async function open(url: string, width: number): Promise<Page> {
  const context = await contextWithCookie(browser, server.url, staff, { width, height: 900 });
  const page = await context.newPage();
  await page.goto(server.url + url);
  return page;
}

async function download(page: Page, name: string) {
  const [file] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name }).click()]);
  const saved = await file.path();
  return { name: file.suggestedFilename(), bytes: new Uint8Array(fs.readFileSync(saved)) };
}

describe("downloads in the browser", () => {
  test("the practical's page links both; the browser saves the workbook and the CSV", async () => {
    const page = await open(`/sessions/${p.session.id}`, 1280);
    const nav = page.getByRole("navigation", { name: "Results" });
    await expect.poll(() => nav.getByRole("link", { name: "Download workbook (.xlsx)" }).count()).toBe(1);
    await page.screenshot({ path: path.join(shots, "exports-session-1280.png"), fullPage: true });

    const xlsx = await download(page, "Download workbook (.xlsx)");
    expect(xlsx.name).toBe(`EXP-B - Practical EXP-B - ${today}.xlsx`);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx.bytes as never);
    expect(wb.worksheets.map((w) => w.name)).toEqual(["Marks", "Practicals", "P1 Practical EXP-B", "P1 G1"]);
    const fits = wb.getWorksheet("P1 Practical EXP-B")!;
    expect(fits.getCell(2, 2).value).toBe("G1");
    expect(fits.getCell(2, 12).type).toBe(ExcelJS.ValueType.Number); // the marking k
    expect(fits.getCell(3, 8).value).toBe("nothing uploaded");

    const csv = await download(page, "Marks (.csv)");
    expect(csv.name).toBe(`EXP-B - Practical EXP-B - marks - ${today}.csv`);
    expect([...csv.bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    expect(new TextDecoder().decode(csv.bytes)).toContain("Student 1 EXP-B");
    // The page is still there (a download is not a navigation).
    expect(new URL(page.url()).pathname).toBe(`/sessions/${p.session.id}`);
    await page.context().close();
  }, 60_000);

  test("the course page links the course workbook", async () => {
    const page = await open(`/courses/${p.course.id}`, 1280);
    const nav = page.getByRole("navigation", { name: "Marks downloads" });
    await expect.poll(() => nav.getByRole("link").count()).toBe(2);
    await page.screenshot({ path: path.join(shots, "exports-course-1280.png"), fullPage: true });
    const xlsx = await download(page, "Download workbook (.xlsx)");
    expect(xlsx.name).toBe(`EXP-B - ${today}.xlsx`);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx.bytes as never);
    expect(wb.getWorksheet("Marks")!.rowCount).toBe(3);
    await page.context().close();
  }, 60_000);

  test("the gradebook pages link the same downloads", async () => {
    for (const [url, navName, file, shot] of [
      [`/sessions/${p.session.id}/gradebook`, "This practical", `EXP-B - Practical EXP-B - ${today}.xlsx`, "exports-session-gradebook-1280.png"],
      [`/courses/${p.course.id}/gradebook`, "Downloads", `EXP-B - ${today}.xlsx`, "exports-course-gradebook-1280.png"],
    ] as const) {
      const page = await open(url, 1280);
      const nav = page.getByRole("navigation", { name: navName });
      await expect.poll(() => nav.getByRole("link", { name: "Marks (.csv)" }).count()).toBe(1);
      await page.screenshot({ path: path.join(shots, shot), fullPage: true });
      expect((await download(page, "Download workbook (.xlsx)")).name).toBe(file);
      await page.context().close();
    }
  }, 60_000);

  test("the pages fit 390 px with the links and pass axe-core", async () => {
    for (const [url, shot, navName] of [
      [`/sessions/${p.session.id}`, "exports-session-390.png", "Results"],
      [`/courses/${p.course.id}`, "exports-course-390.png", "Marks downloads"],
      [`/sessions/${p.session.id}/gradebook`, "exports-session-gradebook-390.png", "This practical"],
      [`/courses/${p.course.id}/gradebook`, "exports-course-gradebook-390.png", "Downloads"],
    ] as const) {
      const page = await open(url, 390);
      await expect.poll(() => page.getByRole("navigation", { name: navName }).getByRole("link", { name: "Marks (.csv)" }).count()).toBe(1);
      await page.screenshot({ path: path.join(shots, shot), fullPage: true });
      expect(await horizontalOverflow(page), url).toBeLessThanOrEqual(0);
      expect(await seriousAxeViolations(page), url).toEqual([]);
      await page.context().close();
    }
  }, 60_000);
});
