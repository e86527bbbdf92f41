// Uploads against the real database: every CSV quirk and .xlsx case through the API, each refusal
// (stored, never lost), 413 past 5 MB, three versions kept byte for byte (SHA-256 compared, also
// by PostgreSQL's own sha256()), and a late upload after the deadline.
import { createHash } from "node:crypto";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import ExcelJS from "exceljs";
import { action as upload } from "~/routes/api/group-submissions";
import { loader as original } from "~/routes/api/submission-original";
import { sequelize } from "~/.server/db/models.server";
import { Submission, SubmissionFile } from "~/.server/db/submissions.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call, request } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";

let p: Practical;
let cookie: string;
const sha = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");

beforeAll(async () => {
  p = await makePractical("UPL-T", { groups: 2, deadline: new Date(Date.now() + 3600_000) });
  cookie = await p.cookie(p.students[0]);
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

async function send(file: { bytes: Uint8Array | string; name: string; type?: string } | null, fields: Record<string, string> = {}) {
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[0].id}/submissions`, cookie, file, fields), { groupId: String(p.groups[0].id) });
  return { status: res.status, body: (await res.json()) as any };
}
const stored = (id: number) => Submission.findByPk(id);

describe("upload parsing (stored and read)", () => {
  test("semicolons with a decimal comma, units in the header", async () => {
    const r = await send({ bytes: "t / min;CA (mmol/L)\n0;20,0\n2;17,9\n4;16,1\n6;14,6\n8;13,4\n", name: "run.csv" });
    expect(r.status).toBe(202);
    expect(r.body).toMatchObject({ version: expect.any(Number), status: "queued", problems: [] });
    const s = (await stored(r.body.id))!;
    expect(s.readings!.points[1]).toEqual([2, 17.9]);
    expect([s.timeUnit, s.concentrationUnit]).toEqual(["min", "mmol/L"]);
  });

  test("tabs, a byte-order mark, Windows line ends, blank lines and extra columns", async () => {
    const r = await send({ bytes: "\uFEFFn\tt / s\tc (mol/L)\tnote\r\n\r\n1\t0\t0,0200\tstart\r\n2\t60\t0,0186\t\r\n\r\n3\t120\t0,0174\t\r\n4\t180\t0,0163\tok\r\n", name: "r.txt" });
    expect(r.status).toBe(202);
    const s = (await stored(r.body.id))!;
    expect(s.readings!.points).toEqual([[0, 0.02], [60, 0.0186], [120, 0.0174], [180, 0.0163]]);
    expect(s.readings!.rowNumbers).toEqual([3, 4, 6, 7]);
    expect([s.timeUnit, s.concentrationUnit]).toEqual(["s", "mol/L"]);
  });

  test("no header: columns 1 and 2 with the units the group chose; bad rows listed by number", async () => {
    const r = await send({ bytes: "0,20\n1,18.9\n2,x\n3,17\n4,16.2\n5,15.4\n", name: "plain.csv" }, { timeUnit: "min", concentrationUnit: "mmol/L", timeColumn: "1", valueColumn: "2" });
    expect(r.status).toBe(202);
    expect(r.body.problems).toEqual([{ row: 3, column: "B", message: '"x" is not a number' }]);
    expect((await stored(r.body.id))!.timeUnit).toBe("min");
  });

  test(".xlsx: first sheet with numbers, cached formula values, clock times to elapsed seconds", async () => {
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet("About").addRow(["invented demo run"]);
    const ws = wb.addWorksheet("Data");
    ws.addRow(["clock", "CA (mmol/L)"]);
    const at = (m: number) => new Date(Date.UTC(1899, 11, 30, 10, m, 0));
    [[0, 20], [2, 18], [4, 16.3], [6, 14.9]].forEach(([m, c]) => ws.addRow([at(m), { formula: `${c}*1`, result: c }]));
    ws.getColumn(1).numFmt = "hh:mm";
    const bytes = new Uint8Array(await wb.xlsx.writeBuffer());
    const r = await send({ bytes, name: "run.xlsx", type: "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet" });
    expect(r.status).toBe(202);
    const s = (await stored(r.body.id))!;
    expect(s.readings!.points).toEqual([[0, 20], [120, 18], [240, 16.3], [360, 14.9]]);
    expect(s.timeUnit).toBe("s");
  });

  test("fields are checked, each named", async () => {
    const r = await send({ bytes: "t,c\n0,1\n1,2\n2,3\n3,4\n", name: "a.csv" }, { timeUnit: "fortnight", reportedK: "fast", measured: "vibes" });
    expect(r.status).toBe(400);
    expect(r.body.errors.map((e: any) => e.path).sort()).toEqual(["measured", "reportedK", "timeUnit"]);
    const none = await send(null);
    expect(none.status).toBe(400);
    expect(none.body.errors[0]).toMatchObject({ path: "file" });
  });
});

describe("refusals are explained, and the file is still kept", () => {
  const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
  const cases: Array<[string, { bytes: Uint8Array | string; name: string }, RegExp]> = [
    ["empty", { bytes: new Uint8Array(0), name: "empty.csv" }, /empty\.csv is empty/],
    ["PNG renamed .csv", { bytes: png, name: "plot.csv" }, /plot\.csv is a PNG image/],
    ["PDF renamed .csv", { bytes: "%PDF-1.7\n1 0 obj\n<<>>\nendobj\n", name: "report.csv" }, /report\.csv is a PDF document/],
    ["no numeric pair", { bytes: "name,comment\na,b\nc,d\ne,f\ng,h\n", name: "words.csv" }, /no pair of numeric columns/],
    ["fewer than 4 rows", { bytes: "t,c\n0,1\n1,0.9\n2,0.8\n", name: "short.csv" }, /only 3 usable row\(s\).*at least 4/],
    // first-order decay c = 20·exp(-0.05 t) (textbook integrated rate law) written by a decimal-comma spreadsheet as comma-separated text
    ["decimal comma in a comma file", { bytes: "t / min,CA (mmol/L)\n0,0,20,00\n2,5,17,65\n5,0,15,58\n7,5,13,75\n", name: "comma.csv" }, /comma\.csv: The numbers seem to use a decimal comma while commas also separate the columns \(row 2: "0,0,20,00"\).*semicolons/],
  ];
  for (const [name, file, message] of cases) {
    test(name, async () => {
      const r = await send(file);
      expect(r.status).toBe(422);
      expect(r.body.status).toBe("refused");
      expect(r.body.errors[0].message).toMatch(message);
      const f = await SubmissionFile.findByPk(r.body.id);
      const sent = typeof file.bytes === "string" ? new TextEncoder().encode(file.bytes) : file.bytes;
      expect(f!.sha256).toBe(sha(sent));
    });
  }

  test("past 5 MB: 413 with a message, nothing stored", async () => {
    const before = await Submission.count();
    const big = new Uint8Array(5 * 1024 * 1024 + 10).fill(0x31);
    const r = await send({ bytes: big, name: "huge.csv" });
    expect(r.status).toBe(413);
    expect(r.body.errors[0].message).toMatch(/larger than the limit of 5 MB/);
    expect(await Submission.count()).toBe(before);
  });
});

describe("versions", () => {
  test("three uploads keep three originals byte for byte", async () => {
    const g = p.groups[1];
    const c2 = await p.cookie(p.students[1]);
    const files = ["t,c\n0,20\n1,18\n2,16.5\n3,15\n", "t;c\n0;20\n1;18,1\n2;16,4\n3;15,1\n4;14\n", "time\tc\n0\t20\n2\t16.6\n4\t14.2\n6\t12.4\n"].map((t) => new TextEncoder().encode(t));
    const ids: number[] = [];
    for (const [i, bytes] of files.entries()) {
      const res: Response = await call(upload, uploadRequest(`/api/groups/${g.id}/submissions`, c2, { bytes, name: `v${i + 1}.csv` }), { groupId: String(g.id) });
      const body = (await res.json()) as any;
      expect(body.version).toBe(i + 1);
      ids.push(body.id);
    }
    for (const [i, id] of ids.entries()) {
      const res: Response = await call(original, request(`/api/submissions/${id}/original`, { cookie: c2 }), { submissionId: String(id) });
      expect(res.status).toBe(200);
      const back = new Uint8Array(await res.arrayBuffer());
      expect(sha(back)).toBe(sha(files[i]));
      expect(res.headers.get("content-disposition")).toContain(`v${i + 1}.csv`);
      expect(res.headers.get("x-content-sha256")).toBe(sha(files[i]));
      const [rows] = await sequelize.query("select encode(sha256(bytes), 'hex') as h, size from submission_files where submission_id = :id", { replacements: { id } });
      expect(rows).toEqual([{ h: sha(files[i]), size: files[i].byteLength }]);
    }
  });

  test("after the deadline an upload is accepted and marked late", async () => {
    await p.session.update({ deadline: new Date(Date.now() - 1000) });
    const r = await send({ bytes: "t,c\n0,20\n1,18\n2,16.5\n3,15\n", name: "late.csv" });
    expect(r.status).toBe(202);
    expect(r.body.late).toBe(true);
    expect((await stored(r.body.id))!.late).toBe(true);
    await p.session.update({ deadline: new Date(Date.now() + 3600_000) });
  });
});
