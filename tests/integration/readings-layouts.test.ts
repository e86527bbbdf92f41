// Layouts spreadsheets and loggers write (issue 16): each class through a real upload and the
// marking job, with readings from the odex ground truth (bench-truth.ts). Honest files get full
// marks; mistaken ones the refusal or flag that names their cause; none is left waiting.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { Submission } from "~/.server/db/submissions.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";
import { benchTruth, everyS, sig4, workbook } from "./bench-truth";

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
  });
});
