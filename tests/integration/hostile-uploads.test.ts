// The hostile files of issue 15, made here, sent where a student or an instructor can send them:
// the upload preview (stores nothing), the upload (stores the refusal with its original) and the
// roster import. Each is refused with a message naming the limit and where, and nothing is built
// first (the .xlsx ones used to exhaust a 4 GB heap; the CSV ones blocked the server for seconds).
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import ExcelJS from "exceljs";
import JSZip from "jszip";
import { action as upload } from "~/routes/api/group-submissions";
import { action as preview } from "~/routes/api/submission-preview";
import { action as rosterAction } from "~/routes/courses/roster";
import { Submission, SubmissionFile } from "~/.server/db/submissions.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call, payloadOf, statusOf } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";

let p: Practical;
let cookie: string;
let instructor: string;

beforeAll(async () => {
  p = await makePractical("HOSTILE-T", { groups: 1 });
  cookie = await p.cookie(p.students[0]);
  instructor = await p.cookie(p.instructor);
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

/** An ordinary exceljs workbook whose sheet XML is then rewritten. */
async function workbook(rewrite: (xml: string) => string): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet("Run");
  ws.addRow(["t / s", "CA (mol/L)"]);
  [[0, 0.02], [60, 0.0186], [120, 0.0174], [180, 0.0163]].forEach((r) => ws.addRow(r));
  const zip = await JSZip.loadAsync(new Uint8Array(await wb.xlsx.writeBuffer()));
  const path = "xl/worksheets/sheet1.xml";
  zip.file(path, rewrite(await zip.file(path)!.async("string")));
  return zip.generateAsync({ type: "uint8array", compression: "DEFLATE" });
}
const noDimension = (xml: string) => xml.replace(/<dimension[^>]*\/>/, "");
/** A cell in the last column (XFD) on 2,000 rows: about 54 kB. */
const lastColumn = () =>
  workbook((x) => noDimension(x).replace("</sheetData>", `${Array.from({ length: 2000 }, (_, i) => `<row r="${i + 6}"><c r="XFD${i + 6}"><v>1</v></c></row>`).join("")}</sheetData>`));
/** One extra row numbered 20,000,000: about 6 kB. */
const farRow = () => workbook((x) => noDimension(x).replace("</sheetData>", '<row r="20000000"><c r="A20000000"><v>5</v></c></row></sheetData>'));
/** A 420 kB CSV whose header has 20,000 columns. */
const wideCsv = () => `${Array.from({ length: 20_000 }, (_, i) => `reading_${String(i).padStart(12, "0")}`).join(",")}\n0,0.02\n60,0.0186\n120,0.0174\n180,0.0163\n`;
/** A 4.8 MB CSV of one line. */
const oneLine = () => Array.from({ length: 700_000 }, (_, i) => ((i % 997) / 7).toFixed(3)).join(",").slice(0, 4_800_000);

const XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";
const files = async () => [
  { name: "wide.xlsx", bytes: await lastColumn(), type: XLSX, message: /^wide\.xlsx, sheet "Run" has a cell in column 16,384 \(XFD6\); at most 200 columns are read/ },
  { name: "far.xlsx", bytes: await farRow(), type: XLSX, message: /^far\.xlsx, sheet "Run" has a row numbered 20,000,000; at most 100,000 rows are read/ },
  { name: "wide.csv", bytes: new TextEncoder().encode(wideCsv()), type: "text/csv", message: /^wide\.csv, row 1: more than 200 columns \(column GS is number 201\); at most 200 columns are read/ },
  { name: "line.csv", bytes: new TextEncoder().encode(oneLine()), type: "text/csv", message: /^line\.csv, row 1: more than 200 columns \(column GS is number 201\)/ },
];

describe("hostile files through the preview, the upload and the roster import", () => {
  test("sizes are those of the issue", async () => {
    const f = await files();
    expect(f[0].bytes.length).toBeLessThan(60_000);
    expect(f[1].bytes.length).toBeLessThan(8_000);
    expect(f[2].bytes.length).toBeGreaterThan(400_000);
    expect(f[3].bytes.length).toBe(4_800_000);
  });

  test("the preview refuses each, naming the limit and where, and stores nothing", async () => {
    const before = await Submission.count({ where: { groupId: p.groups[0].id } });
    for (const f of await files()) {
      const res: Response = await call(preview, uploadRequest(`/api/groups/${p.groups[0].id}/submissions/preview`, cookie, f), { groupId: String(p.groups[0].id) });
      expect(res.status, f.name).toBe(200);
      const body = (await res.json()) as { refused: string | null; fit: unknown };
      expect(body.refused, f.name).toMatch(f.message);
      expect(body.fit).toBeNull();
    }
    expect(await Submission.count({ where: { groupId: p.groups[0].id } })).toBe(before);
  });

  test("the upload answers 422 with the message, and keeps the refused original", async () => {
    for (const f of await files()) {
      const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[0].id}/submissions`, cookie, f), { groupId: String(p.groups[0].id) });
      expect(res.status, f.name).toBe(422);
      const body = (await res.json()) as { id: number; status: string; errors: Array<{ path: string; message: string }> };
      expect(body.status).toBe("refused");
      expect(body.errors[0]).toMatchObject({ path: "file", message: expect.stringMatching(f.message) });
      const stored = await SubmissionFile.findOne({ where: { submissionId: body.id } });
      expect(stored!.size).toBe(f.bytes.length);
    }
  });

  test("the roster import refuses them with its own limits", async () => {
    const roster = (name: string, bytes: Uint8Array, type: string) => {
      const form = new FormData();
      form.append("roster", new File([bytes as BlobPart], name, { type }));
      return new Request(`http://127.0.0.1/courses/${p.course.id}/roster`, { method: "POST", headers: { Cookie: instructor }, body: form });
    };
    const expected: Record<string, RegExp> = {
      "wide.xlsx": /^wide\.xlsx, sheet "Run" has a cell in column 16,384 \(XFD6\); at most 50 columns are read/,
      "far.xlsx": /^far\.xlsx, sheet "Run" has a row numbered 20,000,000; at most 20,000 rows are read/,
      "wide.csv": /^wide\.csv, row 1: more than 50 columns \(column AY is number 51\)/,
    };
    for (const f of (await files()).filter((x) => x.name in expected)) {
      const res = await call(rosterAction, roster(f.name, f.bytes, f.type), { courseId: String(p.course.id) });
      expect(statusOf(res), f.name).toBe(400);
      expect(payloadOf(res).message, f.name).toMatch(expected[f.name]);
    }
  });
});
