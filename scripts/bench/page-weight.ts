// How much JavaScript the gradebook pages load, and how their 600-row table scrolls. Prints:
//   1. each JS file Chromium requests for the course gradebook (and the practical gradebook) as
//      the demo instructor, with its gzip size (zlib, default level, from build/client), and the
//      sum against the 250 kB budget of the course page;
//   2. scrolling the course gradebook of a seeded course of 600 invented students from top to
//      bottom with the mouse wheel: frames seen, median / 95th percentile / longest frame.
// Usage: npx tsx scripts/bench/page-weight.ts   (BENCH_APP_PORT=3190; BENCH_SKIP_BUILD=1 reuses the build)
// Uses its own ratebook_pageweight database (emptied first) and Debian's chromium.
import fs from "node:fs";
import path from "node:path";
import { gzipSync } from "node:zlib";
import { chromium } from "playwright-core";
import { projectRoot } from "../lib/postgres";
import { BENCH_BASE, ensureBuild, machineNote, openBenchDatabase, startAppServer } from "./lib/http-load";

const BUDGET_KB = 250;
const INSTRUCTOR = { email: "instructor@demo.ratebook.invalid", password: "demo-instructor-pass" };
const CHROMIUM = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

const db = await openBenchDatabase("ratebook_pageweight");
const { Course, CourseMembership, User } = await import("../../app/.server/db/models.server");
const { LabSession } = await import("../../app/.server/db/lab-sessions.server");
const demo = (await Course.findOne({ where: { code: "KIN-DEMO" } }))!;
const demoSession = (await LabSession.findOne({ where: { courseId: demo.id }, order: [["id", "ASC"]] }))!;
const instructor = (await User.findOne({ where: { email: INSTRUCTOR.email } }))!;
// A course of 600 invented students for the scrolling figure.
const big = await Course.create({ code: "PW-600", title: "Page weight course (invented)", term: "" });
await CourseMembership.create({ courseId: big.id, userId: instructor.id, role: "instructor" });
const users = await User.bulkCreate(Array.from({ length: 600 }, (_, i) => ({ email: `pw-${i}@bench.ratebook.invalid`, displayName: `Bench Student ${String(i).padStart(3, "0")} (invented)`, role: "member" as const, passwordHash: null })));
await CourseMembership.bulkCreate(users.map((u, i) => ({ courseId: big.id, userId: u.id, role: "student" as const, studentNumber: `PW${i}` })));
await db.close();

ensureBuild();
const app = await startAppServer();
const browser = await chromium.launch({ executablePath: CHROMIUM, args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking"] });
let over = false;
try {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const page = await context.newPage();
  await page.goto(`${BENCH_BASE}/sign-in`);
  await page.getByLabel("E-mail").fill(INSTRUCTOR.email);
  await page.getByLabel("Password").fill(INSTRUCTOR.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/dashboard/);

  const assets = path.join(projectRoot, "build", "client");
  async function weigh(url: string) {
    // A fresh tab with the cache off, so every file the page needs is requested again.
    const tab = await context.newPage();
    const client = await context.newCDPSession(tab);
    await client.send("Network.setCacheDisabled", { cacheDisabled: true });
    const js = new Set<string>();
    tab.on("request", (r) => {
      const u = new URL(r.url());
      if (u.pathname.endsWith(".js")) js.add(u.pathname);
    });
    await tab.goto(BENCH_BASE + url, { waitUntil: "networkidle" });
    await tab.waitForSelector("[data-table][data-hydrated]");
    const files = [...js].map((p) => {
      const bytes = fs.readFileSync(path.join(assets, p));
      return { file: p, raw: bytes.length, gzip: gzipSync(bytes).length };
    });
    files.sort((a, b) => b.gzip - a.gzip);
    await tab.close();
    return files;
  }

  for (const [label, url, budget] of [
    ["course gradebook", `/courses/${demo.id}/gradebook`, true],
    ["practical gradebook", `/sessions/${demoSession.id}/gradebook`, false],
  ] as const) {
    const files = await weigh(url);
    const kB = (n: number) => (n / 1000).toFixed(1).padStart(7);
    console.log(`\nJavaScript of the ${label} page (${url}), as Chromium requests it:`);
    for (const f of files) console.log(`  ${f.file.padEnd(52)} ${kB(f.raw)} kB raw ${kB(f.gzip)} kB gzip`);
    const total = files.reduce((s, f) => s + f.gzip, 0);
    const raw = files.reduce((s, f) => s + f.raw, 0);
    console.log(`  ${`${files.length} files`.padEnd(52)} ${kB(raw)} kB raw ${kB(total)} kB gzip${budget ? `   (budget ${BUDGET_KB} kB gzip: ${total / 1000 <= BUDGET_KB ? "within" : "OVER"})` : ""}`);
    if (budget && total / 1000 > BUDGET_KB) over = true;
  }

  // Scrolling 600 rows: frame intervals while the wheel moves the box from top to bottom.
  await page.goto(`${BENCH_BASE}/courses/${big.id}/gradebook`, { waitUntil: "networkidle" });
  await page.waitForSelector("[data-table][data-hydrated]");
  const box = page.getByRole("region", { name: "Gradebook of this course" });
  await box.hover();
  // A string, not a function: tsx would wrap a named function in a helper the page lacks.
  await page.evaluate(`(() => {
    window.frames_ = [];
    window.stop_ = false;
    let last = performance.now();
    function tick(t) {
      window.frames_.push(t - last);
      last = t;
      if (!window.stop_) requestAnimationFrame(tick);
    }
    requestAnimationFrame(tick);
  })()`);
  const started = Date.now();
  let steps = 0;
  while (!(await box.evaluate((el) => el.scrollTop + el.clientHeight >= el.scrollHeight - 1)) && steps < 400) {
    await page.mouse.wheel(0, 240);
    await page.waitForTimeout(16);
    steps++;
  }
  const frames = await page.evaluate(() => {
    const w = window as unknown as { frames_: number[]; stop_: boolean };
    w.stop_ = true;
    return w.frames_.slice(1);
  });
  const drawn = await page.locator("tbody tr[data-index]").count();
  const sorted = [...frames].sort((a, b) => a - b);
  const q = (p: number) => sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))];
  console.log(`\nScrolling the course gradebook of 600 students to its end (${steps} wheel steps of 240 px, ${((Date.now() - started) / 1000).toFixed(1)} s, ${machineNote()}):`);
  console.log(`  frames ${frames.length}, frame interval median ${q(0.5).toFixed(1)} ms, p95 ${q(0.95).toFixed(1)} ms, longest ${sorted.at(-1)!.toFixed(1)} ms; rows in the page at the end: ${drawn} of 600`);
  await context.close();
} finally {
  await browser.close();
  await app.stop();
}
if (over) process.exit(1);
