// Layouts spreadsheets and loggers write (issue 16): each class through a real upload and the
// marking job, with readings from the odex ground truth (bench-truth.ts). Honest files get full
// marks; mistaken ones the refusal or flag that names their cause; none is left waiting.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { action as preview } from "~/routes/api/submission-preview";
import { Submission } from "~/.server/db/submissions.server";
import { AuditEntry } from "~/.server/db/models.server";
import { sessionGradebook } from "~/.server/gradebook/session.server";
import { courseGradebook } from "~/.server/gradebook/course.server";
import { action as reviewAction } from "~/routes/sessions/review-submission";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call, payloadOf, request } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";
import { benchTruth, clock, everyS, sig4, stopwatch, workbook } from "./bench-truth";

const XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";
let p: Practical;
let cookies: string[];

beforeAll(async () => {
  p = await makePractical("LAYOUT-T", { groups: 3 });
  cookies = await Promise.all(p.students.map((s) => p.cookie(s)));
  await runJobsUntilIdle();
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

async function send(g: number, file: { bytes: Uint8Array | string; name: string; type?: string }, fields: Record<string, string> = {}) {
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[g].id}/submissions`, cookies[g], file, { measured: "concentrationA", ...fields }), { groupId: String(p.groups[g].id) });
  return { status: res.status, body: (await res.json()) as any };
}

async function previewOf(g: number, file: { bytes: Uint8Array | string; name: string; type?: string }, fields: Record<string, string> = {}) {
  const res: Response = await call(preview, uploadRequest(`/api/groups/${p.groups[g].id}/submissions/preview`, cookies[g], file, { measured: "concentrationA", ...fields }), { groupId: String(p.groups[g].id) });
  return { status: res.status, body: (await res.json()) as any };
}

/** Uploads, runs the marking job, and returns the stored version (never left queued). */
async function marked(g: number, file: { bytes: Uint8Array | string; name: string; type?: string }, fields: Record<string, string> = {}) {
  const r = await send(g, file, fields);
  expect(r.status, JSON.stringify(r.body)).toBe(202);
  await runJobsUntilIdle();
  const s = (await Submission.findByPk(r.body.id))!;
  expect(s.status, s.markingError ?? "").toBe("marked");
  return s;
}

describe("a units row under the header row", () => {
  // 60 minutes of readings every 2 min; the group reports the k it was given by its own line.
  const truth = () => benchTruth(p, p.benches[0], everyS(120, 3600));

  test("CSV `time,CA` then `min,mmol/L`: the units are applied and the run gets full marks", async () => {
    const t = truth();
    const lines = ["time,CA", "min,mmol/L", ...t.t.map((s, i) => `${s / 60},${sig4(t.CA[i] * 1000)}`)];
    const s = await marked(0, { bytes: lines.join("\r\n") + "\r\n", name: "logger.csv" }, { reportedK: String(t.k) });
    expect([s.timeUnit, s.concentrationUnit]).toEqual(["min", "mmol/L"]);
    expect(s.readings!.rowNumbers[0]).toBe(3);
    expect(s.readings!.points[1]).toEqual([2, Number(sig4(t.CA[1] * 1000))]);
    expect(s.readings!.notes.join(" ")).toMatch(/Row 2 holds the units, not readings; they were applied \(A \(time\): min, B \(CA\): mmol\/L\)/);
    expect(s.autoMark).toBe(100);
    expect(s.flags).toEqual([]);
  });

  test(".xlsx with a units row in brackets: the same, full marks", async () => {
    const t = truth();
    const bytes = await workbook([["Invented demo run"], ["t", "c(A)"], ["(min)", "(mmol/L)"], ...t.t.map((s, i) => [s / 60, Number(sig4(t.CA[i] * 1000))])]);
    const s = await marked(0, { bytes, name: "sheet.xlsx", type: XLSX }, { reportedK: String(t.k) });
    expect([s.timeUnit, s.concentrationUnit]).toEqual(["min", "mmol/L"]);
    expect(s.readings!.rowNumbers[0]).toBe(4);
    expect(s.autoMark).toBe(100);
  });

  test("a units row that says mol/L over readings in mmol/L: the feed mismatch is flagged, not a silent 0", async () => {
    const t = truth();
    const lines = ["time,CA", "min,mol/L", ...t.t.map((s, i) => `${s / 60},${sig4(t.CA[i] * 1000)}`)];
    const r = await send(0, { bytes: lines.join("\n"), name: "wrong-unit.csv" }, { reportedK: String(t.k) });
    expect(r.status).toBe(202);
    await runJobsUntilIdle();
    const s = (await Submission.findByPk(r.body.id))!;
    expect(s.status).not.toBe("queued");
    expect(s.status).toBe("marked");
    // the readings are 1000 times the feed as the units row reads it: the engine names the unit
    expect(s.flags.find((f) => f.code === "feed-mismatch")).toMatchObject({ factor: 1000 });
    expect(s.feedback.join(" ")).toMatch(/right concentration unit/);
    // one cause, one line: the unit explains the flat line and the "no change"
    expect(s.feedback.join(" ")).not.toMatch(/Take readings for longer|too little change|transform magnifies/);
  });
});

describe("times written as mm:ss, h:mm:ss or clock times", () => {
  // bench 2 (35 degC) over 50 minutes, a reading every 75 s: seconds that are not whole minutes
  const truth = (from = 0) => benchTruth(p, p.benches[1], everyS(75, 3000).map((t) => t + from));
  const csvOf = (times: string[], t: ReturnType<typeof truth>) => ["time,CA (mmol/L)", ...times.map((x, i) => `${x},${sig4(t.CA[i] * 1000)}`)].join("\n") + "\n";

  test("stopwatch mm:ss (03:00): read as minutes:seconds since mixing, full marks, the preview says how", async () => {
    const t = truth();
    const file = { bytes: csvOf(t.t.map((x) => stopwatch(x, "mm:ss")), t), name: "stopwatch.csv" };
    const pre = await previewOf(1, file);
    expect(pre.status).toBe(200);
    expect(pre.body.refused).toBeNull();
    expect(pre.body.timeUnit).toBe("s");
    expect(pre.body.notes.join(" ")).toMatch(/Column A \(time\) holds times written mm:ss \(minutes:seconds\), read as time elapsed since mixing\. For example row 3, 01:15, is 75 s\./);
    const s = await marked(1, file, { reportedK: String(t.k) });
    expect(s.readings!.points.slice(0, 3).map((x) => x[0])).toEqual([0, 75, 150]);
    expect(s.autoMark).toBe(100);
  });

  test("logger h:mm:ss from 0:00:00 (1:03:00): elapsed hours, full marks", async () => {
    const t = benchTruth(p, p.benches[1], everyS(150, 4500));
    const s = await marked(1, { bytes: csvOf(t.t.map((x) => stopwatch(x, "h:mm:ss")), t), name: "logger.csv" }, { reportedK: String(t.k) });
    expect(s.readings!.points.at(-1)![0]).toBe(4500);
    expect(s.readings!.notes.join(" ")).toMatch(/h:mm:ss \(hours:minutes:seconds\), read as time elapsed since mixing/);
    expect(s.autoMark).toBe(100);
  });

  test("clock times from a reading at mixing (14:05:00): counted from the first reading, full marks", async () => {
    const t = truth();
    const s = await marked(1, { bytes: csvOf(t.t.map((x) => clock(14 * 3600 + 5 * 60, x)), t), name: "clock.csv" }, { reportedK: String(t.k) });
    expect(s.readings!.points[2][0]).toBe(150);
    expect(s.readings!.notes.join(" ")).toMatch(/clock times \(hh:mm:ss\), read as seconds since the first reading \(row 2, 14:05:00\)/);
    expect(s.autoMark).toBe(100);
  });

  test("clock times through midnight: the next day goes on counting, full marks", async () => {
    const t = truth();
    const s = await marked(1, { bytes: csvOf(t.t.map((x) => clock(23 * 3600 + 40 * 60, x)), t), name: "night.csv" }, { reportedK: String(t.k) });
    expect(s.readings!.points.at(-1)![0]).toBe(3000);
    expect(s.autoMark).toBe(100);
  });

  test("clock times whose first reading is 45 s after mixing, with the start the group gives: full marks", async () => {
    const t = truth(45);
    const mixing = 9 * 3600 + 30 * 60;
    const file = { bytes: csvOf(t.t.map((x) => clock(mixing, x)), t), name: "late-first.csv" };
    const pre = await previewOf(1, file, { startTime: "09:30:00" });
    expect(pre.body.notes.join(" ")).toMatch(/read as seconds since the start you gave \(09:30:00\)\. For example row 3, 09:32:00, is 120 s\./);
    const s = await marked(1, file, { reportedK: String(t.k), startTime: "09:30:00" });
    expect(s.readings!.points[0][0]).toBe(45);
    expect(s.autoMark).toBe(100);
  });

  test("a start after the first clock reading is refused (422) naming the row; a start that is no clock time is a field error", async () => {
    const t = truth();
    const bytes = csvOf(t.t.map((x) => clock(10 * 3600, x)), t);
    const r = await send(1, { bytes, name: "early.csv" }, { startTime: "10:01" });
    expect(r.status).toBe(422);
    expect(r.body.errors[0].message).toMatch(/^Row 2, column A \(time\): the time 10:00:00 is before the start you gave \(10:01:00\)/);
    const bad = await send(1, { bytes, name: "early.csv" }, { startTime: "ten past" });
    expect(bad.status).toBe(400);
    expect(bad.body.errors).toEqual([{ path: "startTime", message: expect.stringMatching(/clock time of mixing as hh:mm/) }]);
  });

  test(".xlsx with the same clock times typed as text: read as in the CSV, full marks", async () => {
    const t = truth();
    const bytes = await workbook([["time", "CA (mmol/L)"], ...t.t.map((x, i) => [clock(14 * 3600, x), Number(sig4(t.CA[i] * 1000))])]);
    const s = await marked(1, { bytes, name: "typed.xlsx", type: XLSX }, { reportedK: String(t.k) });
    expect(s.readings!.points[1][0]).toBe(75);
    expect(s.autoMark).toBe(100);
  });
});

describe("readings the marking would refuse are refused when the file arrives (422), never left waiting", () => {
  const truth = () => benchTruth(p, p.benches[2], everyS(120, 3600));
  const csvOf = (header: string, values: number[], t: ReturnType<typeof truth>) => [header, ...t.t.map((x, i) => `${x / 60},${sig4(values[i])}`)].join("\n") + "\n";
  async function refusedAtUpload(file: { bytes: string | Uint8Array; name: string; type?: string }, fields: Record<string, string> = {}, g = 2) {
    const r = await send(g, file, fields);
    expect(r.status).toBe(422);
    expect(r.body.status).toBe("refused");
    const [jobs] = await Submission.sequelize!.query("select 1 from graphile_worker._private_jobs j where (j.payload->>'submissionId')::int = :id", { replacements: { id: r.body.id } });
    expect(jobs).toEqual([]);
    expect((await Submission.findByPk(r.body.id))!.status).toBe("refused");
    return r.body.errors[0].message as string;
  }

  test("percent conversion uploaded as a concentration: refused, the cause and the fix named; the preview refuses it too", async () => {
    const t = truth();
    const CA0 = p.benches[2].CA0;
    const file = { bytes: csvOf("t / min,CA (mol/L)", t.CA.map((c) => 100 * (1 - c / CA0)), t), name: "percent.csv" };
    const message = await refusedAtUpload(file);
    expect(message).toMatch(/^percent\.csv: The readings in column B \(CA \(mol\/L\)\) rise from 0 \(row 2\) to [\d.]+ \(row 32\), but the concentration of A can only fall as A reacts: they look like the conversion of A in percent \(0 to 100\), not a concentration\. Send CA = CA0·\(1 − X\/100\) \(CA0 = 0\.02 mol\/L for your bench\)/);
    const pre = await previewOf(2, file);
    expect(pre.body.refused).toMatch(/conversion of A in percent/);
  });

  test("fractional conversion uploaded as a concentration: refused, named as a fraction", async () => {
    const t = truth();
    const CA0 = p.benches[2].CA0;
    const message = await refusedAtUpload({ bytes: csvOf("t / min,CA (mol/L)", t.CA.map((c) => 1 - c / CA0), t), name: "fraction.csv" });
    expect(message).toMatch(/conversion of A as a fraction \(0 to 1\), not a concentration\. Send CA = CA0·\(1 − X\)/);
  });

  test("readings below zero by more than noise (a blank subtracted twice): refused naming the rows", async () => {
    const t = truth();
    const CA0 = p.benches[2].CA0;
    const message = await refusedAtUpload({ bytes: csvOf("t / min,CA (mmol/L)", t.CA.map((c) => (c - 0.45 * CA0) * 1000), t), name: "blank-twice.csv" });
    expect(message).toMatch(/^blank-twice\.csv: Row \d+ of the file, column B \(CA \(mmol\/L\)\): a concentration cannot be negative \(-[\d.]+ is below zero by more than reading noise\)\. The same in \d+ more rows: /);
  });

  test("an honest concentration file at the same bench still gets full marks (the checks refuse only what they name)", async () => {
    const t = truth();
    const s = await marked(2, { bytes: csvOf("t / min,CA (mmol/L)", t.CA.map((c) => c * 1000), t), name: "honest.csv" }, { reportedK: String(t.k) });
    expect(s.autoMark).toBe(100);
  });

  test("%T uploaded as absorbance: refused with A = 2 − log10(%T); the honest absorbance file gets full marks", async () => {
    // an invented absorbance practical: A absorbs, epsilon 40 L/(mol cm), 1 cm cell (Beer-Lambert)
    const q = await makePractical("LAYOUT-ABS", { groups: 1 });
    try {
      await q.system.update({ measured: "absorbance", calibration: { epsilon: 40, pathCm: 1, absorbingSpecies: "A" } });
      const c = await q.cookie(q.students[0]);
      const t = benchTruth(q, q.benches[0], everyS(120, 3600));
      const absorbance = t.CA.map((x) => 40 * 1 * x);
      const sendQ = async (values: number[], name: string, fields: Record<string, string> = {}) => {
        const res: Response = await call(upload, uploadRequest(`/api/groups/${q.groups[0].id}/submissions`, c, { bytes: csvOf("t / min,reading", values, t), name }, fields), { groupId: String(q.groups[0].id) });
        return { status: res.status, body: (await res.json()) as any };
      };
      const pct = await sendQ(absorbance.map((a) => 100 * 10 ** -a), "transmittance.csv");
      expect(pct.status).toBe(422);
      expect(pct.body.errors[0].message).toMatch(/^transmittance\.csv: The readings in column B \(reading\) run from [\d.]+ to [\d.]+ \(row 32\): an absorbance above about 4 cannot be read, so these look like percent transmittance \(%T\), not absorbance\. Convert each reading to absorbance, A = 2 − log10\(%T\)/);
      const honest = await sendQ(absorbance, "absorbance.csv", { reportedK: String(t.k) });
      expect(honest.status).toBe(202);
      await runJobsUntilIdle();
      const s = (await Submission.findByPk(honest.body.id))!;
      expect(s.status, s.markingError ?? "").toBe("marked");
      expect(s.autoMark).toBe(100);
    } finally {
      await q.course.destroy();
    }
  });
});

describe("the version that counts in the gradebook", () => {
  test("the latest marked version counts, not a later refused or failed one; a reviewer may choose another; the course gradebook agrees", async () => {
    const q = await makePractical("COUNT-T", { groups: 1 });
    try {
      const c = await q.cookie(q.students[0]);
      const staff = await q.cookie(q.instructor);
      const t = benchTruth(q, q.benches[0], everyS(120, 3600));
      const honest = ["t / min,CA (mmol/L)", ...t.t.map((x, i) => `${x / 60},${sig4(t.CA[i] * 1000)}`)].join("\n");
      const sendQ = async (file: { bytes: string | Uint8Array; name: string }, fields: Record<string, string> = {}) => {
        const res: Response = await call(upload, uploadRequest(`/api/groups/${q.groups[0].id}/submissions`, c, file, { measured: "concentrationA", ...fields }), { groupId: String(q.groups[0].id) });
        return { status: res.status, body: (await res.json()) as any };
      };
      const row = async () => (await sessionGradebook(q.session.id))!.rows[0];
      const v1 = await sendQ({ bytes: honest, name: "run.csv" }, { reportedK: String(t.k) });
      // version 2: the same readings, a reported k 20 % off the group's own line (analysis part lost)
      const v2 = await sendQ({ bytes: honest, name: "run-again.csv" }, { reportedK: String(t.k * 1.2) });
      await runJobsUntilIdle();
      expect((await Submission.findByPk(v1.body.id))!.autoMark).toBe(100);
      expect((await Submission.findByPk(v2.body.id))!.autoMark).toBe(60);
      // version 3: an image renamed .csv (refused); version 4: a version whose marking fails
      const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 1, 2, 3]);
      expect((await sendQ({ bytes: png, name: "photo-of-lab-book.csv" })).status).toBe(422);
      const v4 = await sendQ({ bytes: honest, name: "last.csv" }, { reportedK: String(t.k) });
      await Submission.sequelize!.query("update submissions set readings = jsonb_set(readings, '{points,3,1}', to_jsonb(-((readings->'points'->0->>1)::float8))) where id = :id", { replacements: { id: v4.body.id } });
      await runJobsUntilIdle();
      expect((await Submission.findByPk(v4.body.id))!.status).toBe("failed");
      expect(await row()).toMatchObject({ submissionId: v2.body.id, version: 2, status: "marked", mark: 60 });
      const course = await courseGradebook(q.course.id);
      expect(course!.rows.find((r) => r.userId === q.students[0].id)!.marks[String(q.session.id)]).toBe(60);
      // a reviewer chooses version 1 (audited); then takes the choice back
      const params = { sessionId: String(q.session.id), submissionId: String(v1.body.id) };
      const chose = payloadOf(await call(reviewAction, request(`/sessions/${q.session.id}/review/${v1.body.id}`, { cookie: staff, form: { intent: "count-this" } }), params));
      expect(chose.ok).toMatch(/Version 1 now counts/);
      expect(await row()).toMatchObject({ submissionId: v1.body.id, mark: 100 });
      expect((await courseGradebook(q.course.id))!.rows.find((r) => r.userId === q.students[0].id)!.marks[String(q.session.id)]).toBe(100);
      expect(await AuditEntry.count({ where: { action: "submission.chosen-to-count", entityId: String(v1.body.id) } })).toBe(1);
      const failedParams = { sessionId: String(q.session.id), submissionId: String(v4.body.id) };
      const refusedChoice = payloadOf(await call(reviewAction, request(`/sessions/${q.session.id}/review/${v4.body.id}`, { cookie: staff, form: { intent: "count-this" } }), failedParams));
      expect(refusedChoice.error).toMatch(/Only a marked version/);
      await call(reviewAction, request(`/sessions/${q.session.id}/review/${v1.body.id}`, { cookie: staff, form: { intent: "count-latest" } }), params);
      expect(await row()).toMatchObject({ submissionId: v2.body.id, mark: 60 });
    } finally {
      await q.course.destroy();
    }
  });
});

describe("feedback: one cause, one line", () => {
  const truth = () => benchTruth(p, p.benches[0], everyS(120, 3600));
  test("constant readings (a probe left in air) are named as such, not as a unit-conversion slip", async () => {
    const t = truth();
    // the reading stays at the feed value with reading noise of 0.1 mmol/L (invented)
    const lines = ["t / min,CA (mmol/L)", ...t.t.map((x, i) => `${x / 60},${(20 + (i % 3 === 0 ? 0.1 : i % 3 === 1 ? -0.1 : 0)).toFixed(1)}`)];
    const s = await marked(0, { bytes: lines.join("\n"), name: "probe-in-air.csv" }, { reportedK: String(t.k) });
    const text = s.feedback.join(" ");
    expect(text).toMatch(/Your readings hardly change from first to last \(20\.1 to [\d.]+\): the probe may have been out of the solution/);
    expect(text).not.toMatch(/unit-conversion factor|right concentration unit|Take readings for longer|too little change/);
  });

  test("a reported k 60 times the group's own line gets a per-minute hint; the honest readings keep the experiment part", async () => {
    const t = truth();
    const lines = ["t / min,CA (mmol/L)", ...t.t.map((x, i) => `${x / 60},${sig4(t.CA[i] * 1000)}`)];
    const s = await marked(0, { bytes: lines.join("\n"), name: "per-minute.csv" }, { reportedK: String(t.k * 60) });
    expect(s.feedback.join(" ")).toMatch(/about 60 times the slope of your own straight line: it looks like a k per minute/);
    expect(s.experimentPart).toBe(60);
    expect(s.analysisPart).toBe(0);
  });

  test("a reported k 1/1000 (or 1000 times) of the group's own line gets a concentration-unit hint at this second-order bench", async () => {
    const t = truth();
    const lines = ["t / min,CA (mmol/L)", ...t.t.map((x, i) => `${x / 60},${sig4(t.CA[i] * 1000)}`)];
    // the slope of 1/CA against t with CA in mmol/L: k in L/(mmol·s), numerically k/1000
    const small = await marked(0, { bytes: lines.join("\n"), name: "per-mmol.csv" }, { reportedK: String(t.k / 1000) });
    expect(small.feedback.join(" ")).toMatch(/about 1\/1000 of the slope of your own straight line: it looks like a k in L\/\(mmol·s\)/);
    expect(small.experimentPart).toBe(60);
    expect(small.analysisPart).toBe(0);
    const large = await marked(0, { bytes: lines.join("\n"), name: "thousand.csv" }, { reportedK: String(t.k * 1000) });
    expect(large.feedback.join(" ")).toMatch(/about 1000 times the slope of your own straight line/);
    expect(large.feedback.join(" ")).not.toMatch(/per minute|1\/1000/);
  });

  test("a workbook whose formulas were never calculated is refused (422) naming that cause and the fix", async () => {
    const t = truth();
    // formulas with no cached values, as a program that writes workbooks without calculating saves them
    const bytes = await workbook([["t / min", "CA (mmol/L)"], ...t.t.map((x, i) => [{ formula: `${x}/60` } as never, { formula: `${sig4(t.CA[i] * 1000)}*1` } as never])]);
    const r = await send(0, { bytes, name: "uncalculated.xlsx", type: XLSX });
    expect(r.status).toBe(422);
    expect(r.body.errors[0].message).toMatch(/^uncalculated\.xlsx: 62 cell\(s\) hold formulas that were never calculated.*Open it in a spreadsheet, let it recalculate, and save it again/);
  });
});
