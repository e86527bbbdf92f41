// The whole round in Debian's chromium: a file the preview refuses cannot be sent; the demo student
// uploads a CSV with a decimal comma, maps its columns, sees the live preview and submits; the demo instructor reviews, overrides one mark
// and releases; the student then reads the feedback page. Screenshots at 1280 and 390 px wide.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, Page } from "playwright-core";
import { signIn, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { submissionFixture, type SubmissionFixture } from "../access/submission-fixture";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { rateConstantAt } from "~/lib/kinetics";
import { simulateRun } from "~/lib/marking/simulate";
import { Submission } from "~/.server/db/submissions.server";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;
let fx: SubmissionFixture;

// Invented readings for the group's bench (made from the reference k at its temperature), written
// the way a spreadsheet with a decimal comma saves them: semicolons, a sample-number column
// first, units in the header, a notes column last.
let CSV = "";
// The same run written as the conversion of A in percent under a concentration header: the
// preview refuses it (range checks at upload), so the page must not send it.
let PERCENT_CSV = "";
let reportedK = "";
let method = "";
const pageErrors: string[] = [];

async function inventedReadings(groupId: number) {
  const bench = (await Bench.findOne({ where: { groupId }, include: [{ model: LabSession, as: "session", include: [{ model: ReactionSystem, as: "reactionSystem" }] }] }))!;
  const rs = bench.session!.reactionSystem!;
  const k = rateConstantAt(rs.kRef, rs.TrefC + 273.15, rs.EaKJ * 1000, bench.temperatureC + 273.15);
  const run = simulateRun({ reaction: { a: rs.coeffA, b: rs.coeffB, orderA: rs.orderA, orderB: rs.orderB }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k, n: 12, seed: 42 });
  const comma = (x: number) => String(x).replace(".", ",");
  CSV = ["Probe;t / min;c(A) / mmol/L;Bemerkung", ...run.rows.map(([t, c], i) => `${i + 1};${comma(t)};${comma(c)};${i === 5 ? "trüb" : ""}`)].join("\n") + "\n";
  const percent = (cMmol: number) => (100 * (1 - cMmol / (bench.CA0 * 1000))).toFixed(2);
  PERCENT_CSV = ["t / min,CA (mol/L)", ...run.rows.map(([t, c]) => `${t},${percent(c)}`)].join("\n") + "\n";
  reportedK = String(run.reportedK);
  method = run.reportedMethod;
}

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  fx = await submissionFixture();
  await inventedReadings(fx.groupId);
  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
  await closeSequelize();
});

async function signedIn(email: string, password: string, returnTo: string, width = 1280): Promise<Page> {
  const page = await browser.newPage({ viewport: { width, height: 900 } });
  page.on("pageerror", (e) => pageErrors.push(`${page.url()}: ${e.message}`));
  page.on("console", (m) => { if (m.type() === "error") pageErrors.push(`${page.url()}: console: ${m.text()}`); });
  await page.goto(`${server.url}/sign-in?returnTo=${encodeURIComponent(returnTo)}`);
  await signIn(page, email, password);
  await page.waitForURL(`${server.url}${returnTo}`);
  // the URL changes before React has drawn the new page
  await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent(), { timeout: 10_000 }).not.toBe("Sign in");
  return page;
}

async function noSidewaysScroll(page: Page) {
  const [scroll, client] = await page.evaluate(() => [document.documentElement.scrollWidth, document.documentElement.clientWidth]);
  expect(scroll, `page is ${scroll} px wide in a ${client} px window`).toBeLessThanOrEqual(client);
}

describe("a file the preview refuses", () => {
  test("is not sent: the preview says why, the button stays disabled and nothing is stored", async () => {
    const before = await Submission.count({ where: { groupId: fx.groupId } });
    const page = await signedIn("student@demo.ratebook.invalid", "demo-student-pass", `/groups/${fx.groupId}/submissions`);
    const posts: string[] = [];
    page.on("request", (r) => { if (r.method() === "POST" && !r.url().includes("/preview")) posts.push(r.url()); });
    await page.locator("#f-file").setInputFiles({ name: "conversion.csv", mimeType: "text/csv", buffer: Buffer.from(PERCENT_CSV, "utf8") });
    const alert = page.getByRole("alert").filter({ hasText: /conversion of A in percent/ });
    await expect.poll(() => alert.count(), { timeout: 10_000 }).toBe(1);
    expect(await alert.textContent()).toMatch(/rise from -?[\d.]+ \(row 2\).*Send CA = CA0·\(1 − X\/100\)/);
    await expect.poll(() => page.getByText("This file cannot be sent as it is: put right what the preview says, or choose another file.").count(), { timeout: 10_000 }).toBe(1);
    const button = page.getByRole("button", { name: "Submit these readings" });
    expect(await button.isDisabled()).toBe(true);
    // pressing Enter in a field of the form must not send it either
    await page.getByLabel(/k you worked out/).fill("0.01");
    await page.getByLabel(/k you worked out/).press("Enter");
    await page.waitForTimeout(1000);
    expect(await button.isDisabled()).toBe(true);
    expect(posts).toEqual([]);
    expect(new URL(page.url()).pathname).toBe(`/groups/${fx.groupId}/submissions`);
    expect(await Submission.count({ where: { groupId: fx.groupId } })).toBe(before);
    await page.close();
  });
});

describe("upload, review, release, feedback", () => {
  let submissionUrl = "";

  test("the student uploads a decimal-comma CSV, maps the columns, sees the preview and submits", async () => {
    const page = await signedIn("student@demo.ratebook.invalid", "demo-student-pass", `/groups/${fx.groupId}/submissions`);
    const requests: string[] = [];
    page.on("response", (r) => requests.push(`${r.request().method()} ${r.url()} ${r.status()}`));
    await page.locator("#f-file").setInputFiles({ name: "bench-readings.csv", mimeType: "text/csv", buffer: Buffer.from(CSV, "utf8") });
    await expect.poll(() => page.getByRole("heading", { name: "Preview (not stored yet)" }).count(), { timeout: 10_000 }).toBe(1);
    // map the columns by hand: time is column B, the reading column C
    await page.getByLabel("Time column", { exact: true }).selectOption({ label: "B: t / min" });
    await page.getByLabel("Reading column", { exact: true }).selectOption({ label: "C: c(A) / mmol/L" });
    await page.getByLabel("Concentration unit").selectOption("mmol/L");
    await page.getByLabel(/k you worked out/).fill(reportedK);
    await page.getByLabel("The plot you used").selectOption(method);
    await expect.poll(async () => (await page.locator("section[aria-labelledby=preview-h]").textContent()) ?? "", { timeout: 10_000 }).toMatch(/12 readings from B: t \/ min \(min\) and C: c\(A\) \/ mmol\/L/);
    const preview = (await page.locator("section[aria-labelledby=preview-h]").textContent()) ?? "";
    expect(preview).toMatch(/k from the straight line: [\d.]+ \(95 % CI [\d.]+ to [\d.]+\) L\/\(mol·s\)/);
    expect(await page.getByRole("img", { name: "Straight-line plot for this feed, with the fitted line" }).count()).toBe(1);
    expect(preview).not.toMatch(/reference|tolerance/i);
    await page.screenshot({ path: path.join(shots, "upload-preview-1280.png"), fullPage: true });
    // the preview has caught up with the last change
    await expect.poll(() => page.getByText("The preview below shows what will be marked.").count(), { timeout: 10_000 }).toBe(1);
    await expect.poll(() => page.getByRole("button", { name: "Submit these readings" }).isEnabled(), { timeout: 10_000 }).toBe(true);
    await page.getByRole("button", { name: "Submit these readings" }).click();
    await page.waitForURL(/\/submissions\/\d+$/);
    submissionUrl = new URL(page.url()).pathname;
    try {
      await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent(), { timeout: 10_000 }).toMatch(/^Received, version \d+$/);
    } catch (e) {
      await page.screenshot({ path: path.join(shots, "upload-submitted-failed.png"), fullPage: true });
      throw new Error(`${(e as Error).message}\nat ${page.url()}; page errors: ${pageErrors.join("\n")}; requests: ${requests.join("\n")}`);
    }
    await page.close();
  });

  test("the instructor reviews, overrides the mark and releases", async () => {
    await runJobsUntilIdle(); // the built app serves pages only; this test process runs the queue
    const id = submissionUrl.split("/").pop()!;
    const page = await signedIn("instructor@demo.ratebook.invalid", "demo-instructor-pass", `/sessions/${fx.sessionId}/review`);
    await page.screenshot({ path: path.join(shots, "review-queue-1280.png"), fullPage: true });
    await page.locator(`a[href="/sessions/${fx.sessionId}/review/${id}"]`).first().click();
    await page.waitForURL(`${server.url}/sessions/${fx.sessionId}/review/${id}`);
    await expect.poll(() => page.getByRole("heading", { name: /^Mark \d/ }).count()).toBe(1);
    await page.getByLabel("Mark, %").fill("85");
    await page.getByLabel("Reason (kept in the audit log)").fill("Careful write-up; the last reading was taken late.");
    await page.getByRole("button", { name: "Set mark" }).click();
    await expect.poll(() => page.getByText("Mark set to 85 %.").count()).toBe(1);
    await expect.poll(() => page.getByRole("heading", { name: /^Mark 85 %/ }).count(), { timeout: 10_000 }).toBe(1);
    await page.screenshot({ path: path.join(shots, "review-submission-1280.png"), fullPage: true });
    await page.getByRole("link", { name: /← Review/ }).click();
    await page.waitForURL(`${server.url}/sessions/${fx.sessionId}/review`);
    await page.getByRole("button", { name: /Release/ }).click();
    await expect.poll(() => page.getByText(/Marks released; \d+ e-mail\(s\) queued/).count()).toBe(1);
    await page.setViewportSize({ width: 390, height: 844 });
    await page.reload();
    await noSidewaysScroll(page);
    await page.screenshot({ path: path.join(shots, "review-queue-390.png"), fullPage: true });
    await page.goto(`${server.url}/sessions/${fx.sessionId}/review/${id}`);
    await noSidewaysScroll(page);
    await page.screenshot({ path: path.join(shots, "review-submission-390.png"), fullPage: true });
    await page.close();
  });

  test("the student reads the feedback page", async () => {
    const page = await signedIn("student@demo.ratebook.invalid", "demo-student-pass", submissionUrl);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent(), { timeout: 10_000 }).toMatch(/^Version \d+: feedback$/);
    const mark = (await page.locator("section[aria-labelledby=mark-h]").textContent()) ?? "";
    expect(mark).toContain("Mark: 85 %");
    expect(mark).toContain("Feedback");
    expect(await page.getByRole("img", { name: "Residuals of the curve fit (reading minus model)" }).count()).toBe(1);
    expect(await page.getByRole("img", { name: "Readings against time with the fitted curve" }).count()).toBe(1);
    expect(((await page.content()) ?? "")).not.toMatch(/kAtT|tolerance/);
    await page.screenshot({ path: path.join(shots, "feedback-1280.png"), fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await page.reload();
    await noSidewaysScroll(page);
    await page.screenshot({ path: path.join(shots, "feedback-390.png"), fullPage: true });
    await page.goto(`${server.url}/groups/${fx.groupId}/submissions`);
    await noSidewaysScroll(page);
    await page.screenshot({ path: path.join(shots, "upload-390.png"), fullPage: true });
    await page.close();
  });
});
