// The gradebook downloads against the real database: a small invented course with three
// practicals (one due and released, one open with a real upload marked by the job, one with
// nothing uploaded). The workbook is opened again with exceljs and each cell's value and type is
// compared with figures worked out here; LibreOffice converts it and its CSV must say the same;
// the CSV download has its byte-order mark and parses back to the same marks; and who may download.
import ExcelJS from "exceljs";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { loader as courseXlsx } from "~/routes/courses/export-xlsx";
import { loader as courseCsv } from "~/routes/courses/export-csv";
import { loader as sessionXlsx } from "~/routes/sessions/export-xlsx";
import { loader as sessionCsv } from "~/routes/sessions/export-csv";
import { CourseMembership, User } from "~/.server/db/models.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { Submission, SubmissionFile, type StoredReadings } from "~/.server/db/submissions.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { saveGradeSettings } from "~/.server/gradebook/settings.server";
import { createApiToken, revokeApiToken } from "~/.server/api-tokens.server";
import { hashPassword } from "~/.server/passwords.server";
import { runCsv, simulateRun, type SimulatedRun } from "~/lib/marking/simulate";
import { call } from "./helpers";
import { makePractical, PASSWORD, uploadRequest, type Practical } from "./practical-fixture";
import { libreOfficeSheets } from "../setup/libreoffice";

const V = ExcelJS.ValueType;
// Molar gas constant, CODATA 2018 exact value (J/(mol·K)).
const R = 8.314462618;

let p: Practical;
let early: LabSession; // due (deadline passed), released, weight 2
let empty: LabSession; // planned, nothing uploaded
let staff: string;
let loner: User;
let run: SimulatedRun;
let g2Readings: StoredReadings;
const today = new Date().toISOString().slice(0, 10);

beforeAll(async () => {
  p = await makePractical("EXP-T", { groups: 3 });
  staff = await p.cookie(p.instructor);
  // Accents in a name must survive the CSV (invented name).
  await p.students[0].update({ displayName: "Zoë Ørsted-Łukasik EXP-T" });
  await CourseMembership.update({ studentNumber: "00042" }, { where: { courseId: p.course.id, userId: p.students[0].id } });
  await CourseMembership.update({ studentNumber: "S-0002" }, { where: { courseId: p.course.id, userId: p.students[1].id } });
  loner = await User.create({ email: "exp-t-loner@test.ratebook.invalid", displayName: "Zed Loner EXP-T", role: "member", passwordHash: await hashPassword(PASSWORD) });
  await CourseMembership.create({ courseId: p.course.id, userId: loner.id, role: "student", studentNumber: "S-0099" });

  const common = { reactionSystemId: p.system.id, slotMinutes: 180, setupMinutes: 30, reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, samplingIntervalS: 60, rubric: p.session.rubric };
  early = await LabSession.create({
    ...common, courseId: p.course.id, title: "Practical EXP-T early", date: "2000-01-10", deadline: new Date("2000-01-11T17:00:00Z"),
    status: "notified", gradeWeight: 2, marksReleasedAt: new Date("2000-01-20T09:00:00Z"),
  });
  const earlyBench = await Bench.create({ sessionId: early.id, position: 1, label: "A", CA0: 0.02, CB0: 0.04, temperatureC: 30, groupId: p.groups[0].id });
  await Bench.create({ sessionId: early.id, position: 2, label: "B", CA0: 0.02, CB0: 0.05, temperatureC: 35, groupId: p.groups[1].id });
  empty = await LabSession.create({ ...common, courseId: p.course.id, title: "Practical EXP-T empty", date: "2099-03-01", deadline: null, status: "planned" });
  await Bench.create({ sessionId: empty.id, position: 1, label: "1", CA0: 0.02, CB0: 0.03, temperatureC: 25, groupId: p.groups[0].id });

  // Group 1 in the open practical: a real upload (readings from the reference k at its bench), marked by the job.
  const bench = p.benches[0];
  run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: 20, seed: 5, mistake: "none" });
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[0].id}/submissions`, await p.cookie(p.students[0]), { bytes: runCsv(run), name: "run G1.csv" }, {
    measured: "concentrationA", reportedK: String(run.reportedK), reportedMethod: run.reportedMethod,
  }), { groupId: String(p.groups[0].id) });
  expect(res.status).toBe(202);
  await runJobsUntilIdle();

  // Group 2 in the open practical: a version stored as marked 70, late, with readings whose time
  // column was clock times read as seconds (its header shows no unit) and one row left out.
  g2Readings = {
    points: [[0, 0.02], [120, 0.0171], [240, 0.015], [360, 0.0133], [480, 0.0119]],
    rowNumbers: [3, 4, 5, 7, 8],
    time: { letter: "A", header: "Clock", unit: "s" },
    value: { letter: "C", header: "c(A) / mmol/L", unit: "mmol/L" },
    notes: ["Times of day in column A were turned into seconds from the first reading."],
  };
  const g2 = await Submission.create({
    groupId: p.groups[1].id, sessionId: p.session.id, benchId: p.benches[1].id, version: 1, submittedAt: new Date("2026-02-03T10:15:00Z"), status: "marked",
    measured: "concentrationA", timeUnit: "s", concentrationUnit: "mmol/L", readings: g2Readings, reportedK: null, reportedMethod: null,
    timeColumn: null, valueColumn: null, submittedById: null, autoMark: 70, late: true, experimentPart: 60, analysisPart: 17.78, latePenalty: 7.78,
    excluded: [{ row: 5, reason: "bubble in the cell", byId: p.instructor.id, at: "2026-02-04T08:00:00Z" }],
  } as never);
  await SubmissionFile.create({ submissionId: g2.id, bytes: Buffer.from("invented"), size: 8, sha256: "0".repeat(64), contentType: "text/csv", originalName: "Gruppe 2 – Messung.csv" });
  // Group 3: marking failed; an instructor set 40 by hand.
  await Submission.create({
    groupId: p.groups[2].id, sessionId: p.session.id, benchId: p.benches[2].id, version: 1, submittedAt: new Date(), status: "failed",
    measured: "concentrationA", timeUnit: "min", concentrationUnit: "mol/L", readings: null, reportedK: null, reportedMethod: null,
    timeColumn: null, valueColumn: null, submittedById: null, overrideMark: 40, overrideReason: "Marked by hand, from the notebook",
  } as never);
  // Group 1 in the early practical: marked 80, no readings kept.
  await Submission.create({
    groupId: p.groups[0].id, sessionId: early.id, benchId: earlyBench.id, version: 1, submittedAt: new Date("2000-01-10T15:00:00Z"), status: "marked",
    measured: "concentrationA", timeUnit: "min", concentrationUnit: "mol/L", readings: null, reportedK: null, reportedMethod: null,
    timeColumn: null, valueColumn: null, submittedById: null, autoMark: 80,
  } as never);
}, 60_000);

afterAll(async () => {
  await p.course.destroy();
  await User.destroy({ where: { id: loner.id } });
  await closeSequelize();
});

function get(loader: (a: any) => unknown, path: string, params: Record<string, string>, headers: Record<string, string> = { Cookie: staff }) {
  return call(loader, new Request(`http://127.0.0.1:3100${path}`, { headers }), params) as Promise<Response>;
}
const courseBook = (headers?: Record<string, string>) => get(courseXlsx, `/courses/${p.course.id}/export.xlsx`, { courseId: String(p.course.id) }, headers);

async function open(res: Response) {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load((await res.arrayBuffer()) as never);
  return wb;
}

/** A sheet's rows as [value, type] per cell, from row 1, column A on. */
function cells(ws: ExcelJS.Worksheet, row: number, from = 1, to = ws.columnCount) {
  const out: Array<[unknown, ExcelJS.ValueType]> = [];
  for (let c = from; c <= to; c++) {
    const cell = ws.getCell(row, c);
    out.push([cell.value, cell.type]);
  }
  return out;
}
const headers = (ws: ExcelJS.Worksheet, to?: number) => cells(ws, 1, 1, to).map(([v]) => v);
const rowOf = (ws: ExcelJS.Worksheet, column: number, text: string) => {
  for (let r = 2; r <= ws.rowCount; r++) if (ws.getCell(r, column).value === text) return r;
  throw new Error(`no row with "${text}" in column ${column} of ${ws.name}`);
};

// Course totals, worked out by hand from the marks above (weighted mean, missing left out):
//   Zoë (group 1): early 80 (weight 2), open 100 (weight 1): (2·80 + 100) / 3 = 86.67
//   Student 2 (group 2): early missing (due), open 70: 70, one due practical missing
//   Student 3 (group 3): no bench in early (missing, due), open 40 (override): 40
//   Zed (no group): nothing counts: empty; early missing
// The empty practical is not due, so it never counts.
const EXPECTED_MARKS = {
  "Zoë Ørsted-Łukasik EXP-T": { id: "00042", group: "G1", early: 80, open: 100, empty: null, total: 86.67, missing: 0 },
  "Student 2 EXP-T": { id: "S-0002", group: "G2", early: null, open: 70, empty: null, total: 70, missing: 1 },
  "Student 3 EXP-T": { id: null, group: "G3", early: null, open: 40, empty: null, total: 40, missing: 1 },
  "Zed Loner EXP-T": { id: "S-0099", group: null, early: null, open: null, empty: null, total: null, missing: 1 },
} as const;

describe("course workbook", () => {
  test("a download named after the course and date, never cached", async () => {
    const res = await courseBook();
    expect(res.status).toBe(200);
    expect(res.headers.get("Content-Type")).toBe("application/vnd.openxmlformats-officedocument.spreadsheetml.sheet");
    expect(res.headers.get("Content-Disposition")).toBe(`attachment; filename="EXP-T - ${today}.xlsx"; filename*=UTF-8''EXP-T%20-%20${today}.xlsx`);
    expect(res.headers.get("Cache-Control")).toBe("private, no-store");
    const wb = await open(res);
    expect(wb.worksheets.map((w) => w.name)).toEqual([
      "Marks", "Practicals", "P1 Practical EXP-T early", "P2 Practical EXP-T", "P2 G1", "P2 G2", "P3 Practical EXP-T empty",
    ]);
    let formulas = 0;
    wb.eachSheet((ws) => {
      expect(ws.views[0], ws.name).toMatchObject({ state: "frozen", ySplit: 1 });
      for (let c = 1; c <= ws.columnCount; c++) expect(ws.getColumn(c).width ?? 0, `${ws.name} column ${c}`).toBeGreaterThan(0);
      ws.eachRow((r) => r.eachCell((cell) => void (cell.type === V.Formula && formulas++)));
    });
    expect(formulas).toBe(0);
  });

  test("marks sheet: student ID, name, group, each mark and whether it is released, the total; missing is empty", async () => {
    const ws = (await open(await courseBook())).getWorksheet("Marks")!;
    expect(headers(ws)).toEqual([
      "Student ID", "Name", "E-mail", "Group",
      "Practical EXP-T early, 2000-01-10 (%)", "Practical EXP-T early, 2000-01-10 released",
      `Practical EXP-T, ${today} (%)`, `Practical EXP-T, ${today} released`,
      "Practical EXP-T empty, 2099-03-01 (%)", "Practical EXP-T empty, 2099-03-01 released",
      "Total (%)", "Due practicals missing",
    ]);
    expect(ws.rowCount).toBe(1 + Object.keys(EXPECTED_MARKS).length);
    const num = (v: number | null): [unknown, ExcelJS.ValueType] => (v === null ? [null, V.Null] : [v, V.Number]);
    const text = (v: string | null): [unknown, ExcelJS.ValueType] => (v === null ? [null, V.Null] : [v, V.String]);
    for (const [name, m] of Object.entries(EXPECTED_MARKS)) {
      const r = rowOf(ws, 2, name);
      expect(cells(ws, r), name).toEqual([
        text(m.id), [name, V.String], text((ws.getCell(r, 3).value as string) ?? null), text(m.group),
        num(m.early), [true, V.Boolean], num(m.open), [false, V.Boolean], num(m.empty), [false, V.Boolean],
        num(m.total), [m.missing, V.Number],
      ]);
    }
    expect(ws.getCell(rowOf(ws, 2, "Zed Loner EXP-T"), 3).value).toBe("exp-t-loner@test.ratebook.invalid");
    expect(ws.getCell(rowOf(ws, 2, "Zoë Ørsted-Łukasik EXP-T"), 5).numFmt).toBe("0.00");
  });

  test("practical sheet: each group's fit with its interval, the reference at T, parts, override and flags", async () => {
    const ws = (await open(await courseBook())).getWorksheet("P2 Practical EXP-T")!;
    const u = "L/(mol·s)";
    expect(headers(ws, 27)).toEqual([
      "Bench", "Group", "Members", "CA0 (mol/L)", "CB0 (mol/L)", "M = CB0/(ν·CA0)", "T (°C)", "Status", "Version", "Submitted at (UTC)", "Late",
      `Marking k (${u})`, `k 95 % CI low (${u})`, `k 95 % CI high (${u})`, `k standard error (${u})`, `Reference k at T (${u})`,
      "Deviation from reference (%)", "Experiment part (%)", "Analysis part (%)", "Late penalty (%)", "Overridden", "Override reason", "Mark (%)",
      "Flags", "Review", "Readings sheet", "Original file",
    ]);
    // The reference beside the table.
    expect(cells(ws, 4, 29, 30)).toEqual([[`Reference k at 25 °C (${u})`, V.String], [0.11, V.Number]]);

    // Group 1: marked by the engine. Its k, interval and standard error are the ones stored with
    // the mark; the reference k at 25 °C is kRef itself; deviation = 100 (k − kRef) / kRef.
    const g1 = (await Submission.findOne({ where: { groupId: p.groups[0].id, sessionId: p.session.id } }))!;
    const fit = g1.fit as { kCI95: [number, number]; kStdErr: number };
    const k = g1.checks!.kMarking;
    const kRef = 0.11; // bench 1 is at the reference temperature, 25 °C
    expect(k).toBeGreaterThan(0.9 * kRef); // readings made from the reference k (within the 10 % band: full mark)
    expect(k).toBeLessThan(1.1 * kRef);
    const r1 = rowOf(ws, 2, "G1");
    const row1 = cells(ws, r1, 1, 27);
    expect([...row1.slice(0, 5), ...row1.slice(6, 9)]).toEqual([
      ["1", V.String], ["G1", V.String], ["Zoë Ørsted-Łukasik EXP-T", V.String], [0.02, V.Number], [0.03, V.Number], [25, V.Number],
      ["marked", V.String], [1, V.Number],
    ]);
    expect(row1[5][1]).toBe(V.Number);
    expect(row1[5][0] as number).toBeCloseTo(0.03 / 0.02, 12);
    expect(row1[9][1]).toBe(V.Date);
    expect(Math.abs((row1[9][0] as Date).getTime() - g1.submittedAt.getTime())).toBeLessThan(1000);
    expect(row1.slice(10, 16)).toEqual([[false, V.Boolean], [k, V.Number], [fit.kCI95[0], V.Number], [fit.kCI95[1], V.Number], [fit.kStdErr, V.Number], [kRef, V.Number]]);
    expect(fit.kCI95[0]).toBeLessThan(k);
    expect(fit.kCI95[1]).toBeGreaterThan(k);
    expect(row1[16][1]).toBe(V.Number);
    expect(row1[16][0] as number).toBeCloseTo((100 * (k - kRef)) / kRef, 9);
    // Flags: the codes of the flags stored with the mark, in their order.
    const flags = g1.flags.length ? [g1.flags.map((f) => f.code).join(", "), V.String] : [null, V.Null];
    expect(row1.slice(20, 27)).toEqual([[false, V.Boolean], [null, V.Null], [100, V.Number], flags, [g1.reviewState, V.String], ["P2 G1", V.String], ["run G1.csv", V.String]]);

    // Group 2: stored figures; reference at 30 °C by Arrhenius from 0.11 at 25 °C, Ea 50 kJ/mol:
    // 0.11 · exp(−50000/R · (1/303.15 − 1/298.15)) = 0.15342…
    const r2 = rowOf(ws, 2, "G2");
    const kRef30 = 0.11 * Math.exp((-50000 / R) * (1 / 303.15 - 1 / 298.15));
    expect(ws.getCell(r2, 16).value as number).toBeCloseTo(kRef30, 12);
    expect(ws.getCell(r2, 16).value as number).toBeCloseTo(0.15342, 4);
    expect(cells(ws, r2, 17, 27)).toEqual([
      [null, V.Null], [60, V.Number], [17.78, V.Number], [7.78, V.Number], [false, V.Boolean], [null, V.Null], [70, V.Number], [null, V.Null], ["to-check", V.String],
      ["P2 G2", V.String], ["Gruppe 2 – Messung.csv", V.String],
    ]);
    expect(ws.getCell(r2, 11).value).toBe(true);
    // Group 3: failed, overridden by hand, no readings sheet.
    const r3 = rowOf(ws, 2, "G3");
    expect(cells(ws, r3, 8, 8)).toEqual([["marking failed", V.String]]);
    expect(cells(ws, r3, 21, 27)).toEqual([[true, V.Boolean], ["Marked by hand, from the notebook", V.String], [40, V.Number], [null, V.Null], ["to-check", V.String], [null, V.Null], [null, V.Null]]);
  });

  test("readings sheets hold the readings as read from the file, with its headers, units and row numbers", async () => {
    const wb = await open(await courseBook());
    // Group 1: the CSV uploaded above: header in row 1 of the file, readings from row 2.
    const g1 = wb.getWorksheet("P2 G1")!;
    expect(headers(g1, 4)).toEqual(["Row in file", run.header[0], run.header[1], "Left out of the fit"]);
    expect(g1.rowCount).toBe(1 + run.rows.length);
    run.rows.forEach(([t, c], i) => {
      expect(cells(g1, i + 2, 1, 4), `reading ${i + 1}`).toEqual([[i + 2, V.Number], [t, V.Number], [c, V.Number], [null, V.Null]]);
    });
    expect(cells(g1, 7, 6, 7)).toEqual([["Original file", V.String], ["run G1.csv", V.String]]);

    // Group 2: a header without its unit gets it added; a header with it stays as written.
    const g2 = wb.getWorksheet("P2 G2")!;
    expect(headers(g2, 4)).toEqual(["Row in file", "Clock (s)", "c(A) / mmol/L", "Left out of the fit"]);
    g2Readings.points.forEach(([t, c], i) => {
      expect(cells(g2, i + 2, 1, 4)).toEqual([[g2Readings.rowNumbers[i], V.Number], [t, V.Number], [c, V.Number], g2Readings.rowNumbers[i] === 5 ? ["bubble in the cell", V.String] : [null, V.Null]]);
    });
    const aside = Object.fromEntries(Array.from({ length: 11 }, (_, i) => [g2.getCell(i + 1, 6).value, g2.getCell(i + 1, 7).value]));
    expect(aside).toMatchObject({
      Practical: "P2 Practical EXP-T", Group: "G2", Bench: "2", Version: 1, "Original file": "Gruppe 2 – Messung.csv",
      "Time column": "A “Clock”, unit s", "Value column": "C “c(A) / mmol/L”, unit mmol/L", Readings: 5, Notes: g2Readings.notes[0],
    });
    expect(aside["Submitted at (UTC)"]).toEqual(new Date("2026-02-03T10:15:00Z"));
  });

  test("a practical with nothing uploaded: its headers and a line saying so", async () => {
    const ws = (await open(await courseBook())).getWorksheet("P3 Practical EXP-T empty")!;
    expect(ws.getCell(1, 1).value).toBe("Bench");
    expect(ws.getCell(1, 27).value).toBe("Original file");
    expect(ws.getCell(2, 1).value).toBe("Nothing uploaded yet: none of the 1 group(s) at a bench has sent readings for this practical.");
    expect(ws.getCell(3, 1).type).toBe(V.Null);
  });

  test("practicals sheet: date, weight, due, released", async () => {
    const ws = (await open(await courseBook())).getWorksheet("Practicals")!;
    expect(headers(ws, 13)).toEqual(["No.", "Practical", "Date", "Status", "Weight", "Deadline (UTC)", "Due", "Marks released", "Released at (UTC)", "Groups at benches", "Groups with a mark", "Reaction system", "Fit sheet"]);
    expect(cells(ws, 2, 1, 13)).toEqual([
      ["P1", V.String], ["Practical EXP-T early", V.String], [new Date("2000-01-10T00:00:00Z"), V.Date], ["notified", V.String], [2, V.Number],
      [new Date("2000-01-11T17:00:00Z"), V.Date], [true, V.Boolean], [true, V.Boolean], [new Date("2000-01-20T09:00:00Z"), V.Date], [2, V.Number], [1, V.Number],
      ["Invented A + B", V.String], ["P1 Practical EXP-T early", V.String],
    ]);
    expect(cells(ws, 3, 7, 11)).toEqual([[false, V.Boolean], [false, V.Boolean], [null, V.Null], [3, V.Number], [3, V.Number]]);
    expect(cells(ws, 5, 15, 16)).toEqual([["Missing work", V.String], ["left out of the total (empty cell)", V.String]]);
  });

  test("LibreOffice opens it and reads the same numbers", async () => {
    const t0 = performance.now();
    const sheets = libreOfficeSheets(new Uint8Array(await (await courseBook()).arrayBuffer()), ["Marks", "P2 Practical EXP-T", "P2 G1", "P3 Practical EXP-T empty"]);
    console.log(`[exports] LibreOffice converted the course workbook (7 sheets) in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
    const marks = sheets.Marks;
    expect(marks[0][0]).toBe("Student ID");
    const cell = (v: number | null) => (v === null ? "" : String(v));
    for (const [name, m] of Object.entries(EXPECTED_MARKS)) {
      const line = marks.find((l) => l[1] === name)!;
      expect([line[0], line[3], line[4], line[5], line[6], line[7], line[8], line[10], line[11]], name).toEqual([
        m.id ?? "", m.group ?? "", cell(m.early), "TRUE", cell(m.open), "FALSE", cell(m.empty), cell(m.total), String(m.missing),
      ]);
    }
    const fitSheet = sheets["P2 Practical EXP-T"];
    const g1 = (await Submission.findOne({ where: { groupId: p.groups[0].id, sessionId: p.session.id } }))!;
    const fit = g1.fit as { kCI95: [number, number]; kStdErr: number };
    const line = fitSheet.find((l) => l[1] === "G1")!;
    // LibreOffice writes at most 15 significant digits.
    [g1.checks!.kMarking, fit.kCI95[0], fit.kCI95[1], fit.kStdErr, 0.11].forEach((v, i) => expect(Number(line[11 + i]) / v, `column ${12 + i}`).toBeCloseTo(1, 13));
    expect([line[0], line[3], line[4], line[6], line[10], line[22]]).toEqual(["1", "0.02", "0.03", "25", "FALSE", "100"]);
    const readings = sheets["P2 G1"];
    run.rows.forEach(([t, c], i) => expect(readings[i + 1].slice(0, 3).map(Number)).toEqual([i + 2, t, c]));
    expect(sheets["P3 Practical EXP-T empty"][1][0]).toMatch(/^Nothing uploaded yet/);
  }, 120_000);

  test("missing work as zero: zeros where a due practical is missing, never where it is not due", async () => {
    await saveGradeSettings(p.instructor, p.course.id, { missingCountsAsZero: true, weights: {} });
    try {
      const ws = (await open(await courseBook())).getWorksheet("Marks")!;
      const s2 = rowOf(ws, 2, "Student 2 EXP-T");
      // early (due): 0; empty practical (not due): empty; total (70·1 + 0·2) / 3 = 23.33
      expect(cells(ws, s2, 5, 11)).toEqual([[0, V.Number], [true, V.Boolean], [70, V.Number], [false, V.Boolean], [null, V.Null], [false, V.Boolean], [23.33, V.Number]]);
      const zed = rowOf(ws, 2, "Zed Loner EXP-T");
      // early 0, open (not due) empty: 0 / 2 = 0
      expect(cells(ws, zed, 5, 11).map(([v]) => v)).toEqual([0, true, null, false, null, false, 0]);
    } finally {
      await saveGradeSettings(p.instructor, p.course.id, { missingCountsAsZero: false, weights: {} });
    }
  });
});

describe("marks CSV", () => {
  test("UTF-8 with a byte-order mark, RFC 4180, the same marks as the sheet", async () => {
    const res = await get(courseCsv, `/courses/${p.course.id}/export.csv`, { courseId: String(p.course.id) });
    expect(res.status).toBe(200);
    expect(res.headers.get("Content-Type")).toBe("text/csv; charset=utf-8");
    expect(res.headers.get("Content-Disposition")).toContain(`filename="EXP-T - marks - ${today}.csv"`);
    const bytes = new Uint8Array(await res.arrayBuffer());
    expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const text = new TextDecoder("utf-8", { ignoreBOM: true }).decode(bytes);
    expect(text.charCodeAt(0)).toBe(0xfeff);
    expect(text).toContain("\r\n");
    const parsed = Papa.parse<Record<string, string>>(text.slice(1), { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data).toHaveLength(4);
    for (const [name, m] of Object.entries(EXPECTED_MARKS)) {
      const row = parsed.data.find((r) => r.Name === name)!;
      expect(row, name).toMatchObject({
        "Student ID": m.id ?? "", Group: m.group ?? "",
        "Practical EXP-T early, 2000-01-10 (%)": m.early === null ? "" : String(m.early),
        "Practical EXP-T early, 2000-01-10 released": "TRUE",
        [`Practical EXP-T, ${today} (%)`]: m.open === null ? "" : String(m.open),
        "Total (%)": m.total === null ? "" : String(m.total),
      });
    }
  });

  test("a practical's CSV has that practical only and no course total", async () => {
    const res = await get(sessionCsv, `/sessions/${p.session.id}/export.csv`, { sessionId: String(p.session.id) });
    expect(res.headers.get("Content-Disposition")).toContain(`filename="EXP-T - Practical EXP-T - marks - ${today}.csv"`);
    const [head, ...rows] = Papa.parse<string[]>((await res.text()).replace(/^\uFEFF/, ""), { skipEmptyLines: true }).data;
    expect(head).toEqual(["Student ID", "Name", "E-mail", "Group", `Practical EXP-T, ${today} (%)`, `Practical EXP-T, ${today} released`]);
    expect(rows.find((r) => r[1] === "Student 3 EXP-T")!.slice(3)).toEqual(["G3", "40", "FALSE"]);
  });
});

describe("practical workbook", () => {
  test("the same sheets for one practical", async () => {
    const res = await get(sessionXlsx, `/sessions/${p.session.id}/export.xlsx`, { sessionId: String(p.session.id) });
    expect(res.status).toBe(200);
    expect(res.headers.get("Content-Disposition")).toContain(`filename="EXP-T - Practical EXP-T - ${today}.xlsx"`);
    const wb = await open(res);
    expect(wb.worksheets.map((w) => w.name)).toEqual(["Marks", "Practicals", "P1 Practical EXP-T", "P1 G1", "P1 G2"]);
    const marks = wb.getWorksheet("Marks")!;
    expect(headers(marks)).toEqual(["Student ID", "Name", "E-mail", "Group", `Practical EXP-T, ${today} (%)`, `Practical EXP-T, ${today} released`]);
    expect(cells(marks, rowOf(marks, 2, "Zoë Ørsted-Łukasik EXP-T"), 5, 6)).toEqual([[100, V.Number], [false, V.Boolean]]);
  });

  test("nothing uploaded: a valid workbook with its headers and a line saying there is nothing yet", async () => {
    const res = await get(sessionXlsx, `/sessions/${empty.id}/export.xlsx`, { sessionId: String(empty.id) });
    const wb = await open(res);
    expect(wb.worksheets.map((w) => w.name)).toEqual(["Marks", "Practicals", "P1 Practical EXP-T empty"]);
    const fits = wb.getWorksheet("P1 Practical EXP-T empty")!;
    expect(fits.getCell(1, 12).value).toBe("Marking k (L/(mol·s))");
    expect(fits.getCell(2, 1).value).toMatch(/^Nothing uploaded yet/);
    // Every student is on the marks sheet, with an empty mark.
    const marks = wb.getWorksheet("Marks")!;
    expect(marks.rowCount).toBe(5);
    for (let r = 2; r <= 5; r++) expect(marks.getCell(r, 5).type).toBe(V.Null);
  });
});

describe("who may download", () => {
  const all = () => [
    () => get(courseXlsx, `/courses/${p.course.id}/export.xlsx`, { courseId: String(p.course.id) }, currentHeaders),
    () => get(courseCsv, `/courses/${p.course.id}/export.csv`, { courseId: String(p.course.id) }, currentHeaders),
    () => get(sessionXlsx, `/sessions/${p.session.id}/export.xlsx`, { sessionId: String(p.session.id) }, currentHeaders),
    () => get(sessionCsv, `/sessions/${p.session.id}/export.csv`, { sessionId: String(p.session.id) }, currentHeaders),
  ];
  let currentHeaders: Record<string, string> = {};
  async function statuses(h: Record<string, string>) {
    currentHeaders = h;
    return Promise.all(all().map(async (f) => (await f()).status));
  }

  test("students 403 (JSON), signed out 401, unknown ids 404", async () => {
    expect(await statuses({ Cookie: await p.cookie(p.students[0]) })).toEqual([403, 403, 403, 403]);
    currentHeaders = { Cookie: await p.cookie(p.students[0]) };
    const refused = await all()[0]();
    expect(refused.headers.get("Content-Type")).toContain("application/json");
    expect((await refused.json()).error).toMatch(/instructors and demonstrators/);
    expect(await statuses({})).toEqual([401, 401, 401, 401]);
    expect((await get(courseXlsx, "/courses/99999999/export.xlsx", { courseId: "99999999" })).status).toBe(404);
    expect((await get(courseCsv, "/courses/x/export.csv", { courseId: "x" })).status).toBe(404);
    expect((await get(sessionXlsx, "/sessions/99999999/export.xlsx", { sessionId: "99999999" })).status).toBe(404);
    expect((await get(sessionCsv, "/sessions/0/export.csv", { sessionId: "0" })).status).toBe(404);
  });

  test("a personal token works as Authorization: Bearer; a revoked one is 401 at once", async () => {
    const { id, token } = await createApiToken(p.instructor, "marks export script", 1);
    expect(await statuses({ Authorization: `Bearer ${token}` })).toEqual([200, 200, 200, 200]);
    const student = await createApiToken(p.students[0], "student script", 1);
    expect(await statuses({ Authorization: `Bearer ${student.token}` })).toEqual([403, 403, 403, 403]);
    expect(await revokeApiToken(p.instructor.id, id)).toBe(true);
    // Not even a valid cookie beside it helps: a bad token is refused.
    expect(await statuses({ Authorization: `Bearer ${token}`, Cookie: staff })).toEqual([401, 401, 401, 401]);
  });
});
