// Planning a practical against the real database: roster import (good, bad, re-import), the feed
// designer (unique benches, times against the textbook closed forms computed here), prep-list
// volumes against hand-computed dilutions, and who may see what.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import ExcelJS from "exceljs";
import { Course, CourseMembership, User, AuditEntry } from "~/.server/db/models.server";
import { Group, GroupMember } from "~/.server/db/groups.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { pendingJobs, runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { action as rosterAction } from "~/routes/courses/roster";
import { action as designAction } from "~/routes/courses/session-new";
import { action as sessionAction, loader as sessionLoader } from "~/routes/sessions/session";
import { loader as sheetLoader } from "~/routes/sessions/bench-sheet";
import { loader as sheetsLoader } from "~/routes/sessions/sheets";
import { loader as prepLoader } from "~/routes/sessions/prep";
import { loader as apiSession } from "~/routes/api/session";
import { action as feedCheck } from "~/routes/api/feed-check";
import { proposeBenches, predictBench, type ReactionForDesign } from "~/lib/planning/feed-design";
import { call, demoCookie, payloadOf, request, statusOf, waitForMail } from "./helpers";

let course: Course;
let instructor: string;
let student: string;
let demoSession: LabSession;
let saponification: ReactionSystem;

beforeAll(async () => {
  course = (await Course.findOne({ where: { code: "KIN-DEMO" } }))!;
  instructor = await demoCookie("instructor");
  student = await demoCookie("student");
  demoSession = (await LabSession.findOne({ where: { courseId: course.id }, order: [["id", "ASC"]] }))!;
  saponification = (await ReactionSystem.findOne({ where: { courseId: course.id, name: "Demo ester saponification (invented)" } }))!;
});

afterAll(() => closeSequelize());

function upload(fileName: string, bytes: Uint8Array | string, type = "text/csv") {
  const form = new FormData();
  form.append("roster", new File([bytes as BlobPart], fileName, { type }));
  return new Request(`http://127.0.0.1/courses/${course.id}/roster`, { method: "POST", headers: { Cookie: instructor }, body: form });
}
const params = () => ({ courseId: String(course.id) });

async function confirm(payload: string) {
  return call(rosterAction, request(`/courses/${course.id}/roster`, { cookie: instructor, form: { intent: "confirm", rows: payload } }), params());
}

describe("roster import", () => {
  const csv = [
    "Student ID,Name,E-mail,Group",
    "R2001,Pat Quill (invented),pat.quill@roster.ratebook.invalid,Lab A",
    "R2002,Robin Ash (invented),robin.ash@roster.ratebook.invalid,Lab A",
    "R2003,Sky Tern (invented),sky.tern@roster.ratebook.invalid,Lab B",
  ].join("\n");

  test("a good file previews every row as new, then saves in one go and queues invitations", async () => {
    const res = await call(rosterAction, upload("class.csv", csv), params());
    expect(statusOf(res)).toBe(200);
    const preview = payloadOf(res);
    expect(preview.kind).toBe("preview");
    expect(preview.rows.map((r: { status: string }) => r.status)).toEqual(["new", "new", "new"]);
    expect(await User.count({ where: { email: "pat.quill@roster.ratebook.invalid" } })).toBe(0); // nothing saved yet

    const saved = payloadOf(await confirm(preview.payload));
    expect(saved.kind).toBe("saved");
    expect(saved.message).toContain("3 added");
    const pat = await User.findOne({ where: { email: "pat.quill@roster.ratebook.invalid" } });
    const m = await CourseMembership.findOne({ where: { courseId: course.id, userId: pat!.id } });
    expect(m!.studentNumber).toBe("R2001");
    const labA = await Group.findOne({ where: { courseId: course.id, name: "Lab A" } });
    expect(await GroupMember.count({ where: { groupId: labA!.id } })).toBe(2);
    expect((await pendingJobs()).filter((j) => j.task === "send-mail").length).toBeGreaterThanOrEqual(3);
    await runJobsUntilIdle();
    const [mail] = await waitForMail("sky.tern@roster.ratebook.invalid");
    expect(mail.text).toMatch(/\/invitation\/[A-Za-z0-9_-]+/);
  });

  test("the form and the mail job share one address check: what is queued is sent, what the job would refuse is refused in the preview", async () => {
    // "~" is a valid address character the job's old check refused (queued, then dropped);
    // a one-letter top-level domain and accented letters the form used to accept.
    const rows = [
      "Student ID,Name,E-mail",
      "R4001,Tilde Person (invented),tilde~person@roster.ratebook.invalid",
      "R4002,Short Top (invented),short.top@roster.c",
      "R4003,Accent Person (invented),andré@roster.ratebook.invalid",
    ].join("\n");
    const preview = payloadOf(await call(rosterAction, upload("mixed.csv", rows), params()));
    expect(preview.rows.map((r: { status: string }) => r.status)).toEqual(["new", "bad", "bad"]);
    expect(preview.rows[1].notes).toContain("the e-mail short.top@roster.c is malformed");
    expect(preview.rows[2].notes.join(" ")).toMatch(/andré@roster\.ratebook\.invalid is malformed \(Use the address in plain characters/);
    const good = [rows.split("\n")[0], rows.split("\n")[1]].join("\n");
    const saved = payloadOf(await confirm(payloadOf(await call(rosterAction, upload("good.csv", good), params())).payload));
    expect(saved.message).toContain("1 added");
    const [mail] = await waitForMail("tilde~person@roster.ratebook.invalid");
    expect(mail.subject).toBe("You are invited to KIN-DEMO on Ratebook");
    expect((await pendingJobs()).filter((j) => j.task === "send-mail")).toEqual([]);
  });

  test("a re-import shows unchanged and updated rows, and updates them (.xlsx)", async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet("Roster");
    ws.addRow(["student id", "name", "email", "group"]);
    ws.addRow(["R2001", "Pat Quill (invented)", "pat.quill@roster.ratebook.invalid", "Lab A"]);
    ws.addRow(["R2002", "Robin Ash-Vale (invented)", "robin.ash@roster.ratebook.invalid", "Lab B"]);
    const bytes = new Uint8Array(await wb.xlsx.writeBuffer());
    const res = await call(rosterAction, upload("class.xlsx", bytes, "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"), params());
    const preview = payloadOf(res);
    expect(preview.rows.map((r: { status: string }) => r.status)).toEqual(["unchanged", "updated"]);
    expect(preview.rows[1].notes.join(" ")).toContain("group Lab A → Lab B");
    const saved = payloadOf(await confirm(preview.payload));
    expect(saved.message).toContain("1 updated, 1 unchanged");
    const robin = await User.findOne({ where: { email: "robin.ash@roster.ratebook.invalid" } });
    // an existing account keeps its own name (issue 15): the roster only changes the course's data
    expect(preview.rows[1].notes.join(" ")).toContain("keeps the account's name Robin Ash (invented)");
    expect(robin!.displayName).toBe("Robin Ash (invented)");
    const gm = await GroupMember.findOne({ where: { userId: robin!.id, courseId: course.id }, include: [{ model: Group, as: "group" }] });
    expect(gm!.group!.name).toBe("Lab B");
  });

  test("bad rows are listed with their row numbers and reasons, and nothing is saved", async () => {
    const bad = [
      "Student ID,Name,E-mail",
      "R3001,Ok Person (invented),ok.person@roster.ratebook.invalid",
      "R3002,,no.name@roster.ratebook.invalid",
      "R3003,Bad Mail (invented),not-an-address",
      "R3001,Dup Id (invented),dup.id@roster.ratebook.invalid",
      "R3005,Dup Mail (invented),ok.person@roster.ratebook.invalid",
      "R3006,No Mail (invented),",
    ].join("\n");
    const preview = payloadOf(await call(rosterAction, upload("bad.csv", bad), params()));
    const byRow = Object.fromEntries(preview.rows.map((r: { row: number; status: string; notes: string[] }) => [r.row, r]));
    expect(byRow[2].status).toBe("new");
    expect(byRow[3].notes).toContain("the name is empty");
    expect(byRow[4].notes).toContain("the e-mail not-an-address is malformed");
    expect(byRow[5].notes).toContain("student ID R3001 is also on row 2");
    expect(byRow[6].notes).toContain("e-mail ok.person@roster.ratebook.invalid is also on row 2");
    expect(byRow[7].notes).toContain("the e-mail is missing");
    // confirming anyway (a crafted post) is refused whole
    const res = await confirm(preview.payload);
    expect(statusOf(res)).toBe(400);
    expect(await User.count({ where: { email: "ok.person@roster.ratebook.invalid" } })).toBe(0);
  });

  test("files that are not a roster get a clear message and change nothing", async () => {
    const before = await CourseMembership.count({ where: { courseId: course.id } });
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
    const cases: Array<[Request, number, string]> = [
      [upload("photo.csv", png), 400, "photo.csv is not a CSV or .xlsx table"],
      [upload("empty.csv", ""), 400, "empty.csv is empty"],
      [upload("huge.csv", new Uint8Array(20 * 1024 * 1024).fill(0x41)), 413, "larger than 2 MiB"],
      [upload("nohead.csv", "a,b,c\n1,2,3"), 400, "the header has no student ID, name, e-mail column"],
      [upload("onlyhead.csv", "Student ID,Name,E-mail\n"), 400, "has a header but no student rows"],
    ];
    for (const [req, status, message] of cases) {
      const res = await call(rosterAction, req, params());
      expect(statusOf(res), message).toBe(status);
      expect(payloadOf(res).message).toContain(message);
    }
    expect(await CourseMembership.count({ where: { courseId: course.id } })).toBe(before);
  });
});

// Textbook integrated second-order law for A + B with -dCA/dt = k CA CB, written out here on its
// own (not the engine's form): t = ln[(CB CA0)/(CB0 CA)] / (k (CB0 - CA0)) for CB0 != CA0, and
// t = (1/CA - 1/CA0) / k for CB0 = CA0 (Levenspiel, Chemical Reaction Engineering, ch. 3; from memory).
function textbookSecondOrderSeconds(k: number, CA0: number, CB0: number, X: number) {
  const reacted = X * Math.min(CA0, CB0);
  const CA = CA0 - reacted;
  const CB = CB0 - reacted;
  if (Math.abs(CB0 - CA0) < 1e-12) return (1 / CA - 1 / CA0) / k;
  return Math.log((CB * CA0) / (CB0 * CA)) / (k * (CB0 - CA0));
}
// Arrhenius: k(T) = kref exp(-Ea/R (1/T - 1/Tref)), R = 8.314462618 J/(mol K) (CODATA 2018).
const kArrhenius = (kref: number, TrefC: number, EaKJ: number, TC: number) => kref * Math.exp((-EaKJ * 1000 / 8.314462618) * (1 / (TC + 273.15) - 1 / (TrefC + 273.15)));

describe("feed designer", () => {
  const reaction: ReactionForDesign = { coeffA: 1, coeffB: 1, orderA: 1, orderB: 1, kRef: 0.11, TrefC: 25, EaKJ: 45 };
  const session = { slotMinutes: 120, setupMinutes: 30, samplingIntervalS: 60, reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, targetConversion: 0.8 };

  test("proposes unique (CA0, CB0, T) benches over both sides of M = 1, one of them stoichiometric", () => {
    const d = proposeBenches(reaction, { benchCount: 8, CA0: 0.01, ratioMin: 0.5, ratioMax: 2, tempMinC: 20, tempMaxC: 35 });
    expect(d.ok).toBe(true);
    if (!d.ok) return;
    const keys = new Set(d.benches.map((b) => `${b.CA0}|${b.CB0}|${b.temperatureC}`));
    expect(keys.size).toBe(8);
    expect(d.benches.some((b) => b.CB0 < b.CA0) && d.benches.some((b) => b.CB0 > b.CA0)).toBe(true);
    expect(d.benches.some((b) => b.CB0 === b.CA0)).toBe(true);
    for (const b of d.benches) expect(b.temperatureC).toBeGreaterThanOrEqual(20);
  });

  test("a ratio and temperature range that cannot give unique benches is refused with where and why", () => {
    const d = proposeBenches(reaction, { benchCount: 6, CA0: 0.01, ratioMin: 1, ratioMax: 1, tempMinC: 25, tempMaxC: 25 });
    expect(d.ok).toBe(false);
    if (d.ok) return;
    expect(d.problems[0].path).toBe("ratioMax");
    expect(d.problems[0].message).toContain("cannot give 6 different benches");
    const bad = proposeBenches(reaction, { benchCount: 3, CA0: 0, ratioMin: 0.5, ratioMax: 2, tempMinC: 20, tempMaxC: 120 });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.problems.map((p) => p.path)).toEqual(expect.arrayContaining(["CA0", "tempMaxC"]));
  });

  test("minutes to target match the textbook closed form with k from Arrhenius, and the slot check uses them", () => {
    for (const [CA0, CB0, T] of [[0.01, 0.005, 20], [0.01, 0.01, 25], [0.01, 0.02, 35], [0.002, 0.002, 5]] as const) {
      const p = predictBench(reaction, session, { label: "x", CA0, CB0, temperatureC: T });
      const expected = textbookSecondOrderSeconds(kArrhenius(0.11, 25, 45, T), CA0, CB0, 0.8) / 60;
      expect(p.minutesToTarget).toBeCloseTo(expected, 6);
      const late = expected > session.slotMinutes - session.setupMinutes;
      expect(p.warnings.some((w) => w.code === "slot"), `bench ${CA0}/${CB0}/${T}: ${expected} min`).toBe(late);
      expect(p.warnings.some((w) => w.code === "few-samples")).toBe(expected * 60 < 8 * session.samplingIntervalS);
    }
    // the 5 C dilute bench takes longer than the 90 min left after set-up
    expect(predictBench(reaction, session, { label: "x", CA0: 0.002, CB0: 0.002, temperatureC: 5 }).warnings[0].code).toBe("slot");
  });

  test("volumes beyond the reactor are a warning in the check and refused on save", async () => {
    const p = predictBench(reaction, { ...session, stockAMolL: 0.01 }, { label: "1", CA0: 0.01, CB0: 0.01, temperatureC: 25 });
    expect(p.warnings.map((w) => w.code)).toContain("volume");
    const form: Record<string, string> = {
      intent: "save", title: "Overfull (test)", date: "2027-03-01", reactionSystemId: String(saponification.id), slotMinutes: "120", setupMinutes: "30",
      reactorVolumeMl: "250", stockAMolL: "0.01", stockBMolL: "0.1", samplingIntervalS: "60", targetConversionPct: "80",
      fullWithinPct: "10", partialWithinPct: "25", partialFraction: "0.5", analysisMarks: "40", analysisFullWithinPct: "2", analysisPartialWithinPct: "10", analysisPartialFraction: "0.5", latePenaltyPct: "10", correctionCostPct: "10",
      "benches[0].label": "1", "benches[0].CA0": "0.01", "benches[0].CB0": "0.01", "benches[0].temperatureC": "25",
    };
    const before = await LabSession.count();
    const res = await call(designAction, request(`/courses/${course.id}/sessions/new`, { cookie: instructor, form }), params());
    expect(statusOf(res)).toBe(400);
    expect(payloadOf(res).formErrors.join(" ")).toContain("more than the 250 mL reactor");
    // bad numbers: a zero feed, a temperature out of range, a zero slot
    const res2 = await call(designAction, request(`/courses/${course.id}/sessions/new`, { cookie: instructor, form: { ...form, stockAMolL: "0.1", slotMinutes: "0", "benches[0].CA0": "0", "benches[0].temperatureC": "130" } }), params());
    const errors = payloadOf(res2).result.error;
    expect(errors.slotMinutes[0]).toContain("longer than 0 minutes");
    expect(errors["benches[0].CA0"][0]).toContain("above 0");
    expect(errors["benches[0].temperatureC"][0]).toContain("0 to 100");
    expect(payloadOf(res2).result.initialValue.title).toBe("Overfull (test)"); // what was typed comes back
    expect(await LabSession.count()).toBe(before);
  });

  test("saving a designed session, assigning groups, notifying, and auditing later changes", async () => {
    const form: Record<string, string> = {
      intent: "propose", title: "Designed in a test (invented)", date: "2027-03-02", reactionSystemId: String(saponification.id), slotMinutes: "150", setupMinutes: "30",
      reactorVolumeMl: "200", stockAMolL: "0.1", stockBMolL: "0.1", samplingIntervalS: "60", targetConversionPct: "75",
      fullWithinPct: "10", partialWithinPct: "25", partialFraction: "0.5", analysisMarks: "40", analysisFullWithinPct: "2", analysisPartialWithinPct: "10", analysisPartialFraction: "0.5", latePenaltyPct: "10", correctionCostPct: "10",
      benchCount: "6", CA0: "0.01", ratioMin: "0.5", ratioMax: "2", tempMinC: "20", tempMaxC: "30",
    };
    const proposed = payloadOf(await call(designAction, request(`/courses/${course.id}/sessions/new`, { cookie: instructor, form }), params()));
    expect(proposed.rows).toHaveLength(6);
    const save: Record<string, string> = { ...form, intent: "save" };
    proposed.rows.forEach((r: { label: string; CA0: number; CB0: number; temperatureC: number }, i: number) => {
      Object.assign(save, { [`benches[${i}].label`]: r.label, [`benches[${i}].CA0`]: String(r.CA0), [`benches[${i}].CB0`]: String(r.CB0), [`benches[${i}].temperatureC`]: String(r.temperatureC) });
    });
    const saved = await call(designAction, request(`/courses/${course.id}/sessions/new`, { cookie: instructor, form: save }), params());
    expect(saved.status).toBe(302);
    const sessionId = Number(saved.headers.get("Location").split("/").pop());
    const p = { sessionId: String(sessionId) };
    expect(await Bench.count({ where: { sessionId } })).toBe(6);

    const assigned = payloadOf(await call(sessionAction, request(`/sessions/${sessionId}`, { cookie: instructor, form: { intent: "assign-auto" } }), p));
    expect(assigned.message).toMatch(/^6 group\(s\) have a bench/);
    const notified = payloadOf(await call(sessionAction, request(`/sessions/${sessionId}`, { cookie: instructor, form: { intent: "notify" } }), p));
    expect(notified.tone).toBe("info");
    await runJobsUntilIdle();
    const bench = (await Bench.findOne({ where: { sessionId }, order: [["position", "ASC"]] }))!;
    const member = await GroupMember.findOne({ where: { groupId: bench.groupId! }, include: [{ model: User, as: "user" }] });
    const mails = await waitForMail(member!.user!.email);
    expect(mails.some((m) => m.text.includes(`/sessions/${sessionId}/benches/${bench.id}/sheet`))).toBe(true);

    const edit = await call(sessionAction, request(`/sessions/${sessionId}`, { cookie: instructor, form: { intent: "edit-bench", benchId: String(bench.id), label: bench.label, CA0: "0.012", CB0: String(bench.CB0), temperatureC: String(bench.temperatureC) } }), p);
    expect(statusOf(edit)).toBe(200);
    const audit = await AuditEntry.findOne({ where: { entityType: "lab_session", entityId: String(sessionId), action: "session.bench-changed-after-notice" } });
    expect((audit!.before as { CA0: number }).CA0).toBe(bench.CA0);
    expect((audit!.after as { CA0: number }).CA0).toBe(0.012);

    const details = { intent: "edit-details", title: "Designed in a test (invented)", date: "2027-03-02", slotMinutes: "150", setupMinutes: "30", samplingIntervalS: "60", deadline: "2027-03-09T17:00" };
    const bad = await call(sessionAction, request(`/sessions/${sessionId}`, { cookie: instructor, form: { ...details, slotMinutes: "0" } }), p);
    expect(statusOf(bad)).toBe(400);
    expect(payloadOf(bad).details.error.slotMinutes[0]).toContain("longer than 0 minutes");
    expect((await LabSession.findByPk(sessionId))!.slotMinutes).toBe(150); // nothing stored changed
    // an impossible day or trailing text is refused beside the field (was a 500, or 31 Feb kept as 3 Mar)
    for (const [field, value, message] of [
      ["deadline", "2027-02-31T17:00", "no such date"],
      ["deadline", "2027-03-09T17:00 tomorrow", "nothing after it"],
      ["date", "2027-02-30", "no such day"],
    ] as const) {
      const r = await call(sessionAction, request(`/sessions/${sessionId}`, { cookie: instructor, form: { ...details, [field]: value } }), p);
      expect(statusOf(r), value).toBe(400);
      expect(payloadOf(r).details.error[field][0]).toContain(message);
    }
    expect((await LabSession.findByPk(sessionId))!.deadline).toBeNull();
    expect(statusOf(await call(sessionAction, request(`/sessions/${sessionId}`, { cookie: instructor, form: details }), p))).toBe(200);
    const changed = await AuditEntry.findOne({ where: { entityId: String(sessionId), action: "session.details-changed-after-notice" } });
    expect((changed!.before as { deadline: string | null }).deadline).toBeNull();
    expect((changed!.after as { deadline: string }).deadline).toBe("2027-03-09T17:00:00.000Z");
  });
});

describe("prep list", () => {
  test("volumes are C1 V1 = C2 V2 by hand, totals carry the margin", async () => {
    const res = payloadOf(await call(prepLoader, request(`/sessions/${demoSession.id}/prep?margin=10`, { cookie: instructor }), { sessionId: String(demoSession.id) }));
    const V = demoSession.reactorVolumeMl;
    let sumA = 0;
    for (const r of res.rows) {
      // V1 = C2 V2 / C1, e.g. 0.0100 mol/L x 250 mL / 0.100 mol/L = 25.0 mL (textbook dilution)
      expect(r.volumes.stockAMl).toBeCloseTo((r.CA0 * V) / demoSession.stockAMolL, 9);
      expect(r.volumes.stockBMl).toBeCloseTo((r.CB0 * V) / demoSession.stockBMolL, 9);
      expect(r.volumes.waterMl).toBeCloseTo(V - r.volumes.stockAMl - r.volumes.stockBMl, 9);
      sumA += r.volumes.stockAMl;
    }
    expect(res.rows[0].volumes.stockAMl).toBeCloseTo(25, 9); // 0.01 x 250 / 0.1, worked by hand
    expect(res.totals.stockAMl).toBeCloseTo(sumA, 9);
    expect(res.totals.withMargin.stockAMl).toBeCloseTo(sumA * 1.1, 9);
  });
});

describe("who sees what", () => {
  const REFERENCE_KEYS = ["reference", "kAtT", "EaKJ", "rubric", "fullWithinPct", "tolerancePct", "warnings"];
  const hasKey = (value: unknown, keys: string[]): string[] => {
    const found: string[] = [];
    JSON.stringify(value, (k, v) => {
      if (keys.includes(k)) found.push(k);
      return v;
    });
    return found;
  };

  test("the API gives staff the reference and a student only their own bench, without it", async () => {
    const staff = await call(apiSession, request(`/api/sessions/${demoSession.id}`, { cookie: instructor }), { sessionId: String(demoSession.id) });
    const staffJson = await staff.json();
    expect(staffJson.reaction.reference.k).toBe(0.11);
    expect(staffJson.benches).toHaveLength(8);
    const mine = await call(apiSession, request(`/api/sessions/${demoSession.id}`, { cookie: student }), { sessionId: String(demoSession.id) });
    const text = await mine.text();
    const json = JSON.parse(text);
    expect(json.benches).toHaveLength(1);
    expect(json.benches[0].groupName).toBe("Group 1");
    expect(hasKey(json, REFERENCE_KEYS)).toEqual([]);
    expect(text).not.toContain("0.11"); // the reference k's digits appear nowhere
    const other = await Bench.findOne({ where: { sessionId: demoSession.id, label: "2" } });
    expect(text).not.toContain(`"id":${other!.id},`);
  });

  test("a student asking for another group's sheet or the staff pages gets 404/403 and no values", async () => {
    const p = { sessionId: String(demoSession.id) };
    const other = (await Bench.findOne({ where: { sessionId: demoSession.id, label: "2" } }))!;
    const res = await call(sheetLoader, request(`/sessions/${demoSession.id}/benches/${other.id}/sheet`, { cookie: student }), { ...p, benchId: String(other.id) });
    expect(statusOf(res)).toBe(404);
    expect(JSON.stringify(payloadOf(res))).not.toContain(String(other.CB0));
    expect(statusOf(await call(sheetsLoader, request(`/sessions/${demoSession.id}/sheets`, { cookie: student }), p))).toBe(403);
    expect(statusOf(await call(prepLoader, request(`/sessions/${demoSession.id}/prep`, { cookie: student }), p))).toBe(403);
    const check = await call(feedCheck, new Request("http://127.0.0.1/api/feed-check", { method: "POST", headers: { Cookie: student, "Content-Type": "application/json" }, body: JSON.stringify({ reactionSystemId: saponification.id, session: {}, benches: [] }) }), {});
    expect(check.status).toBe(403);
    const page = payloadOf(await call(sessionLoader, request(`/sessions/${demoSession.id}`, { cookie: student }), p));
    expect(hasKey(page, REFERENCE_KEYS)).toEqual([]);
    expect(page.view.benches).toHaveLength(1);
    const own = payloadOf(await call(sheetLoader, request(`/sessions/${demoSession.id}/benches/${page.view.benches[0].id}/sheet`, { cookie: student }), { ...p, benchId: String(page.view.benches[0].id) }));
    expect(hasKey(own, ["kRef", "EaKJ", "rubric", "kAtT"])).toEqual([]);
    expect(own.hazards.length).toBeGreaterThan(0);
  });

  test("the feed check answers staff with predictions and problems with their paths", async () => {
    const body = {
      reactionSystemId: saponification.id,
      session: { slotMinutes: 120, setupMinutes: 30, samplingIntervalS: 60, reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, targetConversion: 0.8 },
      benches: [{ label: "1", CA0: 0.01, CB0: 0.02, temperatureC: 25 }, { label: "2", CA0: 0.01, CB0: 0.02, temperatureC: 25 }],
    };
    const res = await call(feedCheck, new Request("http://127.0.0.1/api/feed-check", { method: "POST", headers: { Cookie: instructor, "Content-Type": "application/json" }, body: JSON.stringify(body) }), {});
    const json = await res.json();
    expect(json.problems[0].path).toBe("benches[1].CA0");
    expect(json.problems[0].message).toContain("same feed and temperature as bench 1");
    body.benches[1].temperatureC = 30;
    const ok = await (await call(feedCheck, new Request("http://127.0.0.1/api/feed-check", { method: "POST", headers: { Cookie: instructor, "Content-Type": "application/json" }, body: JSON.stringify(body) }), {})).json();
    expect(ok.problems).toEqual([]);
    const expected = textbookSecondOrderSeconds(kArrhenius(0.11, 25, 45, 30), 0.01, 0.02, 0.8) / 60;
    expect(ok.benches[1].minutesToTarget).toBeCloseTo(expected, 6);
  });
});
