// The gradebooks in Chromium: sorting and filtering a practical's rows, the choice of columns
// surviving a reload, and a course of 600 (invented) students scrolled to its end, with the
// virtualised rows drawn as they come into view and no Content-Security-Policy violation.
// Screenshots in test-results/gradebook/.
import fs from "node:fs";
import path from "node:path";
import { Op } from "sequelize";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, Page } from "playwright-core";
import { contextWithCookie, horizontalOverflow, seriousAxeViolations, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { CourseMembership, User } from "~/.server/db/models.server";
import { Submission } from "~/.server/db/submissions.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { makePractical, type Practical } from "../integration/practical-fixture";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results", "gradebook");
let p: Practical;
let cookie: string;
let server: AppServer;
let browser: Browser;

// Invented given names and family names; 20 × 30 = 600 combinations, the first 593 used.
const GIVEN = ["Ada", "Bram", "Cleo", "Dara", "Emil", "Faye", "Gil", "Hana", "Ivo", "Jola", "Kemal", "Luz", "Mads", "Nell", "Otto", "Pia", "Quin", "Rhea", "Sami", "Tove"];
const FAMILY = [
  "Arvel", "Brisk", "Corran", "Dovell", "Elmund", "Farrow", "Gelt", "Hollin", "Istrel", "Jarrow", "Kestle", "Lorn", "Marrick", "Nesbel", "Orrin",
  "Pellow", "Quarry", "Rendle", "Stoat", "Tarrel", "Umber", "Vane", "Wetherel", "Yarrow", "Zell", "Ashcombe", "Brindle", "Cardew", "Dunmer", "Eskell",
];
// Sorts after every other name, whatever the collation: the row at the very end.
const LAST_NAME = "Zora Quillfeather (invented)";

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  p = await makePractical("GBB", { groups: 6 });
  cookie = await p.cookie(p.instructor);
  const base = { sessionId: p.session.id, submittedAt: new Date(), status: "marked", measured: "concentrationA", timeUnit: "min", concentrationUnit: "mol/L", readings: null, reportedK: null, reportedMethod: null, timeColumn: null, valueColumn: null, submittedById: null };
  const marks: Array<[number, object]> = [
    [0, { autoMark: 55 }],
    [1, { autoMark: 90 }],
    // group 3 (index 2) uploads nothing
    [3, { autoMark: 70, late: true, latePenalty: 10 }],
    [4, { status: "failed", autoMark: null, overrideMark: 40, overrideReason: "Marked by hand from the lab notebook (invented)" }],
    [5, { autoMark: 100 }],
  ];
  for (const [i, fields] of marks) await Submission.create({ ...base, groupId: p.groups[i].id, benchId: p.benches[i].id, version: 1, ...fields } as never);

  // 600 students in all: the fixture's 6 and 594 more, made through the models in two statements.
  const names = Array.from({ length: 593 }, (_, i) => `${GIVEN[i % GIVEN.length]} ${FAMILY[Math.floor(i / GIVEN.length)]}`);
  names.push(LAST_NAME);
  const users = await User.bulkCreate(names.map((displayName, i) => ({ email: `gbb-x${i}@test.ratebook.invalid`, displayName, role: "member" as const, passwordHash: null })));
  await CourseMembership.bulkCreate(users.map((u, i) => ({ courseId: p.course.id, userId: u.id, role: "student" as const, studentNumber: `T${String(i).padStart(4, "0")}` })));

  ({ server, browser } = await startBrowserApp());
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
  await p?.course.destroy();
  await User.destroy({ where: { email: { [Op.like]: "gbb-x%@test.ratebook.invalid" } } });
  await closeSequelize();
});

async function live(page: Page) {
  await page.waitForSelector("[data-table][data-hydrated]");
}

/** The groups in the order the table shows them. */
async function groupOrder(page: Page): Promise<string[]> {
  const cells = await page.locator("tbody tr[data-index] td:first-child").allTextContents();
  return cells.map((t) => t.replace(" (review)", "").trim());
}

describe("a practical's gradebook", () => {
  test("sorts by mark both ways (missing last), filters per column and by search, and keeps the chosen columns over a reload", async () => {
    const context = await contextWithCookie(browser, server.url, cookie);
    const page = await context.newPage();
    await page.goto(`${server.url}/sessions/${p.session.id}/gradebook`, { waitUntil: "networkidle" });
    await live(page);
    expect(await groupOrder(page)).toEqual(["G1", "G2", "G3", "G4", "G5", "G6"]);
    // Missing work reads as missing, never as 0.
    const g3 = page.locator("tbody tr[data-index]").filter({ hasText: "G3" });
    await expect.poll(() => g3.textContent()).toContain("no upload");
    expect(await g3.textContent()).not.toMatch(/\b0 %/);

    const markHeader = page.getByRole("columnheader", { name: /^Mark \(%\)/ });
    await page.getByRole("button", { name: "Mark (%)", exact: true }).click();
    await expect.poll(() => markHeader.getAttribute("aria-sort")).toBe("ascending");
    // 40 (set by hand), 55, 70, 90, 100, then the group with no upload
    expect(await groupOrder(page)).toEqual(["G5", "G1", "G4", "G2", "G6", "G3"]);
    await page.getByRole("button", { name: "Mark (%)", exact: true }).click();
    await expect.poll(() => markHeader.getAttribute("aria-sort")).toBe("descending");
    expect(await groupOrder(page)).toEqual(["G6", "G2", "G4", "G1", "G5", "G3"]);

    await page.getByLabel("Filter Mark", { exact: true }).fill("> 60");
    await expect.poll(() => groupOrder(page)).toEqual(["G6", "G2", "G4"]);
    await expect.poll(() => page.getByRole("status").first().textContent()).toContain("3 of 6 groups");
    await page.getByLabel("Filter Late", { exact: true }).selectOption("yes");
    await expect.poll(() => groupOrder(page)).toEqual(["G4"]);
    await page.screenshot({ path: path.join(shots, "session-filtered-1280.png"), fullPage: true });
    await page.getByRole("button", { name: "Clear search and filters" }).click();
    await expect.poll(() => groupOrder(page)).toHaveLength(6);
    await page.getByLabel("Search groups, members, benches").fill("Student 3 GBB");
    await expect.poll(() => groupOrder(page)).toEqual(["G3"]);
    await page.getByLabel("Search groups, members, benches").fill("");
    await expect.poll(() => groupOrder(page)).toHaveLength(6);

    // Hide a column; the view is saved for this person and the page opens with it next time.
    await page.getByText("Columns", { exact: true }).click();
    const saved = page.waitForResponse((r) => r.url().includes("/api/table-views/session-gradebook") && r.request().method() === "POST" && (r.request().postData() ?? "").includes('"members"'));
    await page.getByLabel("Members", { exact: true }).uncheck();
    expect((await saved).status()).toBe(200);
    expect(await page.getByRole("columnheader", { name: /^Members/ }).count()).toBe(0);
    await page.reload({ waitUntil: "networkidle" });
    await live(page);
    expect(await page.getByRole("columnheader", { name: /^Members/ }).count()).toBe(0);
    expect(await page.getByRole("columnheader", { name: /^Bench/ }).count()).toBe(1);
    expect(await page.getByText("Columns (1 hidden)").count()).toBe(1);
    // the sort came back too (server-rendered in that order)
    expect(await groupOrder(page)).toEqual(["G6", "G2", "G4", "G1", "G5", "G3"]);
    expect(await markHeader.getAttribute("aria-sort")).toBe("descending");
    await page.getByText("Columns (1 hidden)").click();
    expect(await page.getByLabel("Members", { exact: true }).isChecked()).toBe(false);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.screenshot({ path: path.join(shots, "session-1280.png"), fullPage: true });
    await context.close();
  });
});

/** Whether the element lies wholly inside the scrolling box's visible part. */
async function inBox(page: Page, name: RegExp, boxLabel: RegExp) {
  const box = (await page.getByRole("region", { name: boxLabel }).boundingBox())!;
  const cell = (await page.getByRole("columnheader", { name }).boundingBox())!;
  return cell.x >= box.x - 1 && cell.x + cell.width <= box.x + box.width + 1;
}

describe("the deciding column stays in view", () => {
  test("the group and the mark are pinned: both in view without scrolling sideways at 1280 and 390 px, also when scrolled", async () => {
    for (const width of [1280, 390]) {
      const context = await contextWithCookie(browser, server.url, cookie, { width, height: 844 });
      const page = await context.newPage();
      await page.goto(`${server.url}/sessions/${p.session.id}/gradebook`, { waitUntil: "networkidle" });
      await live(page);
      const boxLabel = /^Gradebook of this practical/;
      expect(await inBox(page, /^Group/, boxLabel), `group at ${width}`).toBe(true);
      expect(await inBox(page, /^Mark \(%\)/, boxLabel), `mark at ${width}`).toBe(true);
      // scrolled sideways to the middle, both are still there
      await page.getByRole("region", { name: boxLabel }).evaluate((el) => el.scrollBy({ left: 400 }));
      expect(await inBox(page, /^Group/, boxLabel)).toBe(true);
      expect(await inBox(page, /^Mark \(%\)/, boxLabel)).toBe(true);
      await page.screenshot({ path: path.join(shots, `session-pinned-${width}.png`), fullPage: true });
      await context.close();
    }
  });
});

describe("a course's gradebook with 600 students", () => {
  test("the server sends the first rows only, without style attributes", async () => {
    const res = await fetch(`${server.url}/courses/${p.course.id}/gradebook`, { headers: { Cookie: cookie } });
    expect(res.status).toBe(200);
    const html = await res.text();
    // The table as drawn (the loader's data for hydration follows in a script, all 600 rows).
    const table = html.slice(html.indexOf("<table"), html.indexOf("</table>"));
    const rows = table.match(/<tr data-index="/g) ?? [];
    expect(rows.length).toBeGreaterThan(10);
    expect(rows.length).toBeLessThan(80);
    expect(table.includes("Ada Arvel")).toBe(true);
    expect(table.includes(LAST_NAME)).toBe(false);
    // The CSP refuses style attributes in the page's HTML: there are none, anywhere in it.
    expect(/<[^>]+\sstyle=/.test(html)).toBe(false);
  });

  test("scrolls smoothly to the end: rows come into view as the box scrolls, with no CSP violation", async () => {
    // No bypassCSP here: the page runs under its real Content-Security-Policy.
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const eq = cookie.indexOf("=");
    await context.addCookies([{ name: cookie.slice(0, eq), value: cookie.slice(eq + 1), url: server.url }]);
    const page = await context.newPage();
    const problems: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error" || /Content Security Policy|Refused to/.test(m.text())) problems.push(m.text());
    });
    page.on("pageerror", (e) => problems.push(e.message));
    await page.addInitScript(() => document.addEventListener("securitypolicyviolation", (e) => console.error(`Refused to: ${e.violatedDirective} ${e.blockedURI}`)));
    await page.goto(`${server.url}/courses/${p.course.id}/gradebook`, { waitUntil: "networkidle" });
    await live(page);
    await expect.poll(() => page.getByRole("status").first().textContent()).toContain("All 600 students");
    const drawn = () => page.locator("tbody tr[data-index]").count();
    expect(await drawn()).toBeLessThan(80);
    const last = page.getByText(LAST_NAME);
    expect(await last.count()).toBe(0);

    const box = page.getByRole("region", { name: "Gradebook of this course" });
    await box.hover();
    // Scroll down the box in wheel steps, as a person would.
    const atEnd = () => box.evaluate((el) => el.scrollTop + el.clientHeight >= el.scrollHeight - 1);
    for (let i = 0; i < 80 && !(await atEnd()); i++) {
      await page.mouse.wheel(0, 800);
      await page.waitForTimeout(30);
    }
    await expect.poll(() => last.isVisible(), { timeout: 5_000 }).toBe(true);
    // ... and it is inside the box's visible part, not just somewhere in the page.
    const shownBox = (await box.boundingBox())!;
    const lastBox = (await last.boundingBox())!;
    expect(lastBox.y).toBeGreaterThanOrEqual(shownBox.y);
    expect(lastBox.y + lastBox.height).toBeLessThanOrEqual(shownBox.y + shownBox.height + 1);
    expect(await drawn()).toBeLessThan(80);
    // The spacer rows above the drawn ones were sized through the DOM: the box really is scrolled.
    expect(await box.evaluate((el) => el.scrollTop)).toBeGreaterThan(15_000);
    // The header stays in view at the top of the box.
    const header = await page.getByRole("columnheader", { name: /^Name/ }).boundingBox();
    const region = await box.boundingBox();
    expect(Math.abs(header!.y - region!.y)).toBeLessThan(3);
    await box.screenshot({ path: path.join(shots, "course-600-scrolled-1280.png") });
    expect(problems).toEqual([]);
    await context.close();
  });

  test("no serious accessibility violation and no sideways overflow at 390 px", async () => {
    const context = await contextWithCookie(browser, server.url, cookie, { width: 390, height: 844 });
    const page = await context.newPage();
    await page.goto(`${server.url}/courses/${p.course.id}/gradebook`, { waitUntil: "networkidle" });
    await live(page);
    expect(await horizontalOverflow(page)).toBeLessThanOrEqual(0);
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.screenshot({ path: path.join(shots, "course-600-390.png"), fullPage: true });
    await context.close();
  });
});
