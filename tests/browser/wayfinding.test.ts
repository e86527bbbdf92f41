// Finding the way, walked by clicking from the dashboard in Debian's chromium: a student reaches
// the upload page in one click from the dashboard and straight from the assignment e-mail's link
// (read from the test mail sink); an automatic fill shows at once and a save after it keeps every
// bench's group; taking a group off a bench asks first; every page names its place (course >
// practical > page) and each step of that trail leads back.
import fs from "node:fs";
import path from "node:path";
import { Op } from "sequelize";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, Page } from "playwright-core";
import { signIn, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { Course } from "~/.server/db/models.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { mailTo } from "../integration/helpers";
import { doubledWords } from "~/lib/words";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;
let courseId: number;
let demo: LabSession;

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  ({ server, browser } = await startBrowserApp());
  courseId = (await Course.findOne({ where: { code: "KIN-DEMO" } }))!.id;
  demo = (await LabSession.findOne({ where: { courseId }, order: [["id", "ASC"]] }))!;
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
  await closeSequelize();
});

async function signedIn(who: string, width = 1280): Promise<Page> {
  const page = await browser.newPage({ viewport: { width, height: 900 } });
  page.setDefaultTimeout(10_000);
  await page.goto(`${server.url}/sign-in`);
  await signIn(page, `${who}@demo.ratebook.invalid`, `demo-${who}-pass`);
  await page.waitForURL(`${server.url}/dashboard`);
  return page;
}

const assignedCount = (sessionId: number) => Bench.count({ where: { sessionId, groupId: { [Op.ne]: null } } });

describe("finding the way", () => {
  test("student: the dashboard leads with the next step, one click to the upload page", async () => {
    for (const width of [1280, 390]) {
      const page = await signedIn("student", width);
      const next = page.getByRole("region", { name: "What to do next" });
      await expect.poll(() => next.getByText(/bench 1 · feed CA0/).count()).toBeGreaterThan(0);
      expect(await next.getByText(/Your latest upload/).count()).toBeGreaterThan(0);
      await page.screenshot({ path: path.join(shots, `dashboard-student-${width}.png`), fullPage: true });
      await next.getByRole("link", { name: /Upload readings|Marks and uploads/ }).first().click();
      await page.waitForURL(/\/groups\/\d+\/submissions$/);
      await expect.poll(() => page.getByRole("heading", { name: /^Upload readings: / }).count()).toBe(1);
      expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBe(0);
      await page.close();
    }
  });

  test("instructor: taking a group off asks first; an automatic fill shows at once and a save keeps every group", async () => {
    const page = await signedIn("instructor");
    await page.getByRole("link", { name: "KIN-DEMO" }).first().click();
    await page.waitForURL(`${server.url}/courses/${courseId}`);
    await page.getByRole("link", { name: demo.title, exact: true }).click();
    await page.waitForURL(`${server.url}/sessions/${demo.id}`);
    const before = await assignedCount(demo.id);
    expect(before).toBeGreaterThan(1);

    // clearing bench 2 by hand: nothing is saved until the person says yes
    await page.getByLabel("Group at bench 2").selectOption("");
    await page.getByRole("button", { name: "Save group assignment" }).click();
    await expect.poll(() => page.getByText(/This takes the group off bench 2\. Nothing was saved/).count()).toBe(1);
    expect(await assignedCount(demo.id)).toBe(before);
    await page.getByLabel("Yes, take these groups off their benches").check();
    await page.getByLabel("Group at bench 2").selectOption("");
    await page.getByRole("button", { name: "Save group assignment" }).click();
    await expect.poll(() => assignedCount(demo.id)).toBe(before - 1);

    // the automatic fill: the menu shows the placed group without a reload, and saving keeps all
    await page.getByRole("button", { name: "Fill empty benches automatically" }).click();
    await expect.poll(() => page.getByText(/group\(s\) have a bench/).count()).toBe(1);
    await expect.poll(() => assignedCount(demo.id)).toBe(before);
    await expect.poll(() => page.getByLabel("Group at bench 2").inputValue()).not.toBe("");
    await page.getByRole("button", { name: "Save group assignment" }).click();
    await expect.poll(() => page.getByText(/group\(s\) have a bench/).count()).toBe(1);
    expect(await assignedCount(demo.id)).toBe(before);
    await page.close();
  });

  test("student: the assignment e-mail's upload link opens the upload page (sign-in on the way)", async () => {
    const page = await signedIn("instructor");
    await page.goto(`${server.url}/dashboard`);
    await page.getByRole("link", { name: "KIN-DEMO" }).first().click();
    await page.waitForURL(`${server.url}/courses/${courseId}`);
    await page.getByRole("link", { name: demo.title, exact: true }).click();
    await page.waitForURL(`${server.url}/sessions/${demo.id}`);
    await page.getByRole("button", { name: "E-mail the groups" }).click();
    await expect.poll(() => page.getByText(/e-mail\(s\) queued/).count()).toBe(1);
    await page.close();
    await runJobsUntilIdle();
    let link = "";
    await expect.poll(async () => {
      const mails = (await mailTo("student@demo.ratebook.invalid")).filter((m) => m.text.includes("Upload your readings here"));
      link = mails.at(-1)?.text.match(/https?:\/\/\S+\/groups\/\d+\/submissions/)?.[0] ?? "";
      return link;
    }).not.toBe("");
    const student = await browser.newPage({ viewport: { width: 390, height: 900 } });
    // the mail's address, on this test server (the mail names the configured app address)
    await student.goto(`${server.url}${new URL(link).pathname}`);
    await student.waitForURL(/\/sign-in\?returnTo=/);
    await signIn(student, "student@demo.ratebook.invalid", "demo-student-pass");
    await student.waitForURL(/\/groups\/\d+\/submissions$/);
    await expect.poll(() => student.getByRole("heading", { name: /^Upload readings: Group 1$/ }).count()).toBe(1);
    await student.close();
  });

  test("every page shows where it sits, and the trail leads back by clicking", async () => {
    for (const width of [1280, 390]) {
      const page = await signedIn("instructor", width);
      const trail = () => page.getByRole("navigation", { name: "You are here" });
      const steps = async () => (await trail().getByRole("listitem").allInnerTexts()).map((t) => t.replace("›", "").trim());
      // headings and column names on the page now shown: no word or unit said twice in a row
      const doubled: string[] = [];
      let labels = 0;
      const checkWords = async () => {
        for (const label of await page.locator("h1, h2, h3, th").allInnerTexts()) {
          labels++;
          if (doubledWords(label).length) doubled.push(`${page.url()} (${width} px): "${label}"`);
        }
      };
      await expect.poll(steps).toEqual(["Dashboard"]);
      await page.getByRole("link", { name: "KIN-DEMO" }).first().click();
      await page.waitForURL(`${server.url}/courses/${courseId}`);
      await expect.poll(steps).toEqual(["Dashboard", "KIN-DEMO"]);

      // reaction systems: a course page; its trail goes back to the course
      await page.getByRole("link", { name: "Reaction systems" }).click();
      await page.waitForURL(`${server.url}/courses/${courseId}/reactions`);
      await expect.poll(steps).toEqual(["Dashboard", "KIN-DEMO", "Reaction systems"]);
      await checkWords();
      await trail().getByRole("link", { name: "KIN-DEMO" }).click();
      await page.waitForURL(`${server.url}/courses/${courseId}`);

      // the practical's print pages: back to the practical, then to the course, then home
      await page.getByRole("link", { name: demo.title, exact: true }).click();
      await page.waitForURL(`${server.url}/sessions/${demo.id}`);
      await expect.poll(steps).toEqual(["Dashboard", "KIN-DEMO", demo.title]);
      await checkWords();
      for (const [link, place, url] of [["Prep list (print)", "Prep list", "/prep"], ["Bench sheets (print)", "Bench sheets", "/sheets"]] as const) {
        await page.getByRole("link", { name: link }).click();
        await page.waitForURL(new RegExp(`/sessions/${demo.id}${url}`));
        await expect.poll(steps).toEqual(["Dashboard", "KIN-DEMO", demo.title, place]);
        await checkWords();
        await page.screenshot({ path: path.join(shots, `trail-${url.slice(1)}-${width}.png`) });
        expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBe(0);
        await trail().getByRole("link", { name: demo.title }).click();
        await page.waitForURL(`${server.url}/sessions/${demo.id}`);
      }
      await trail().getByRole("link", { name: "KIN-DEMO" }).click();
      await page.waitForURL(`${server.url}/courses/${courseId}`);
      await checkWords();
      await trail().getByRole("link", { name: "Dashboard" }).click();
      await page.waitForURL(`${server.url}/dashboard`);
      await checkWords();
      expect(labels).toBeGreaterThan(20);
      expect(doubled).toEqual([]);
      await page.close();
    }
  });
});
