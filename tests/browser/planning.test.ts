// End to end in Debian's chromium: the demo instructor imports a roster, adds a reaction system,
// designs a 6-bench practical in the designer (a live check shows a warning), assigns groups,
// e-mails them, and prints the bench sheets and prep list to PDF; the demo student sees only
// their own bench sheet. PDFs and screenshots land in test-results/.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, Page } from "playwright-core";
import { signIn, startBrowserApp, stopBrowserApp, type AppServer } from "./harness";
import { Course } from "~/.server/db/models.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { mailTo } from "../integration/helpers";

const shots = path.resolve(import.meta.dirname, "..", "..", "test-results");
let server: AppServer;
let browser: Browser;
let courseId: number;

beforeAll(async () => {
  fs.mkdirSync(shots, { recursive: true });
  ({ server, browser } = await startBrowserApp());
  courseId = (await Course.findOne({ where: { code: "KIN-DEMO" } }))!.id;
}, 180_000);

afterAll(async () => {
  await stopBrowserApp(server, browser);
  await closeSequelize();
});

/** Pages in a PDF made by chromium (one "/Type /Page" object each). */
const pdfPages = (pdf: Buffer) => (pdf.toString("latin1").match(/\/Type\s*\/Page(?![s\w])/g) ?? []).length;

async function signedIn(who: string, width = 1280): Promise<Page> {
  const page = await browser.newPage({ viewport: { width, height: 900 } });
  await page.goto(`${server.url}/sign-in`);
  await signIn(page, `${who}@demo.ratebook.invalid`, `demo-${who}-pass`);
  await page.waitForURL(`${server.url}/dashboard`);
  return page;
}

describe("planning a practical in the browser", () => {
  test("instructor: roster, reaction system, 6-bench design with a warning, groups, e-mails, printed sheets and prep list", async () => {
    const page = await signedIn("instructor");

    await page.goto(`${server.url}/courses/${courseId}`);
    await page.getByRole("link", { name: "Roster import" }).click();
    const csv = "Student ID,Name,E-mail,Group\nB9001,Tove Brink (invented),tove.brink@browser.ratebook.invalid,Bench crew\nB9002,Uli Marsh (invented),uli.marsh@browser.ratebook.invalid,Bench crew\n";
    await page.setInputFiles("#roster", { name: "roster.csv", mimeType: "text/csv", buffer: Buffer.from(csv) });
    await page.getByRole("button", { name: "Preview" }).click();
    await expect.poll(() => page.getByRole("heading", { name: /Preview of roster.csv: 2 new/ }).count()).toBe(1);
    await page.getByRole("button", { name: "Save 2 change(s)" }).click();
    await expect.poll(() => page.getByText("Saved: 2 added").count()).toBe(1);

    await page.goto(`${server.url}/courses/${courseId}/reactions`);
    await page.getByLabel("Name", { exact: true }).fill("Browser reaction (invented)");
    await page.getByLabel("Species A").fill("demo ester Q");
    await page.getByLabel("Species B").fill("hydroxide");
    await page.getByLabel("k at Tref (per s, mol/L)").fill("0.2");
    await page.getByLabel("Ea (kJ/mol)").fill("40");
    await page.getByLabel("Initial conductivity (mS/cm)").fill("2.5");
    await page.getByLabel("Final conductivity (mS/cm)").fill("1.0");
    await page.getByLabel("Reagent 1", { exact: true }).fill("sodium hydroxide solution, 0.1 mol/L");
    await page.getByLabel("Hazard statements").first().fill("H290, H314");
    await page.getByLabel("Pictograms").first().fill("GHS05");
    await page.getByRole("button", { name: "Add to the library" }).click();
    await expect.poll(() => page.getByText("Browser reaction (invented) added to the library.").count()).toBe(1);

    await page.goto(`${server.url}/courses/${courseId}/sessions/new`);
    await page.getByLabel("Title").fill("Browser-designed practical (invented)");
    await page.getByLabel("Reaction system").selectOption({ label: "Demo ester saponification (invented) (A + B)" });
    await page.getByRole("textbox", { name: "Benches", exact: true }).fill("6");
    await page.getByRole("button", { name: "Propose benches" }).click();
    await expect.poll(() => page.getByRole("heading", { name: "Benches (6)" }).count()).toBe(1);
    // a dilute, cold feed at bench 1 cannot finish in the slot: the live check says so without a reload
    const url = page.url();
    await page.getByLabel("CA0, bench 1").fill("0.001");
    await page.getByLabel("CB0, bench 1").fill("0.0005");
    await page.getByLabel("Temperature, bench 1").fill("2");
    await expect.poll(() => page.getByText(/Warning: Needs \d+ min to reach 80 % conversion/).count(), { timeout: 10_000 }).toBe(1);
    expect(page.url()).toBe(url);
    await page.screenshot({ path: path.join(shots, "designer-warning.png"), fullPage: true });
    await page.setViewportSize({ width: 390, height: 900 });
    expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBe(0);
    await page.screenshot({ path: path.join(shots, "designer-warning-390.png"), fullPage: true });
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.getByRole("button", { name: "Save practical" }).click();
    await page.waitForURL(/\/sessions\/\d+$/);
    const sessionId = Number(new URL(page.url()).pathname.split("/").pop());
    expect(await Bench.count({ where: { sessionId } })).toBe(6);

    await page.getByRole("button", { name: "Fill empty benches automatically" }).click();
    await expect.poll(() => page.getByText(/6 group\(s\) have a bench/).count()).toBe(1);
    await page.getByRole("button", { name: "E-mail the groups" }).click();
    await expect.poll(() => page.getByText(/e-mail\(s\) queued/).count()).toBe(1);
    await runJobsUntilIdle();
    const bench1 = (await Bench.findOne({ where: { sessionId }, order: [["position", "ASC"]] }))!;
    // groups are placed by name, so the roster's "Bench crew" takes bench 1
    await expect.poll(async () => (await mailTo("tove.brink@browser.ratebook.invalid")).some((m) => m.text.includes(`/sessions/${sessionId}/benches/${bench1.id}/sheet`))).toBe(true);

    // printed: one bench a page on A4 and on Letter; the prep list
    await page.goto(`${server.url}/sessions/${sessionId}/sheets`);
    await page.emulateMedia({ media: "print" });
    const sheetsA4 = await page.pdf({ preferCSSPageSize: true });
    fs.writeFileSync(path.join(shots, "bench-sheets-a4.pdf"), sheetsA4);
    expect(pdfPages(sheetsA4)).toBe(6);
    await page.goto(`${server.url}/sessions/${sessionId}/sheets?paper=letter`);
    const sheetsLetter = await page.pdf({ preferCSSPageSize: true });
    fs.writeFileSync(path.join(shots, "bench-sheets-letter.pdf"), sheetsLetter);
    expect(pdfPages(sheetsLetter)).toBe(6);
    expect(sheetsLetter.toString("latin1")).toMatch(/MediaBox\s*\[\s*0 0 612 792\s*\]/); // US Letter in points

    await page.goto(`${server.url}/sessions/${sessionId}/prep?margin=15`);
    expect(await page.getByText("Follow your institution's risk assessment and local rules.").count()).toBe(1);
    expect(await page.getByText(/0\.0010 × 250 \/ 0\.100 = 2\.5 mL/).count()).toBe(1); // bench 1's C1 V1 = C2 V2, by hand
    const prep = await page.pdf({ preferCSSPageSize: true });
    fs.writeFileSync(path.join(shots, "prep-list-a4.pdf"), prep);
    expect(pdfPages(prep)).toBe(1);
    expect(prep.toString("latin1")).toMatch(/MediaBox\s*\[\s*0 0 59[45]\.\d+ 841\.\d+\s*\]/); // A4 is 595 x 842 points
    await page.close();
  });

  test("student: only their own bench sheet, no reference values, another group's sheet is not found", async () => {
    const demo = (await LabSession.findOne({ where: { courseId }, order: [["id", "ASC"]] }))!;
    const page = await signedIn("student", 390);
    await page.goto(`${server.url}/sessions/${demo.id}`);
    await page.getByRole("link", { name: "open your bench sheet" }).click();
    await expect.poll(() => page.getByRole("heading", { name: "Bench 1 · Group 1" }).count()).toBe(1);
    const html = await page.content();
    for (const secret of ["kAtT", "EaKJ", "kRef", "rubric", "Ea =", "0.11"]) expect(html, secret).not.toContain(secret);
    expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBe(0);
    await page.screenshot({ path: path.join(shots, "bench-sheet-student-390.png"), fullPage: true });
    const other = (await Bench.findOne({ where: { sessionId: demo.id, label: "2" } }))!;
    const res = await page.goto(`${server.url}/sessions/${demo.id}/benches/${other.id}/sheet`);
    expect(res!.status()).toBe(404);
    expect(await page.content()).not.toContain(String(other.CB0));
    await page.close();
  });
});
