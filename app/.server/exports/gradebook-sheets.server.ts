// The sheets of a gradebook download, built from figures already gathered (ExportData: plain
// values, Maps and Dates, so it crosses to a worker thread as is): the workbook runs in the
// compute pool (app/.server/compute/), the data gathering and the answer stay in
// gradebook-export.server.ts. No database here.
import { FEED_RATIO_HEADER } from "~/lib/planning/feed-ratio";
import type { Exclusion, StoredReadings } from "../db/submissions.server";
import type { CourseGradebook, CourseGradebookRow } from "../gradebook/course.server";
import type { SessionGradebook, SessionGradebookRow } from "../gradebook/session.server";
import { toCsv, type CellValue, type SheetColumn } from "~/lib/exports/table";
import { unitText } from "~/lib/format";
import { addTableSheet, CSV_TYPE, downloadName, newWorkbook, sheetName, workbookBytes, XLSX_TYPE } from "./workbook.server";

/** What one practical contributes to an export. */
export interface PracticalPart {
  /** 1-based, in date order: "P1", "P2", ... name its sheets */
  n: number;
  book: SessionGradebook;
  /** closed, released or past its deadline (missing work there is missing) */
  due: boolean;
  released: boolean;
  /** the readings of each row's latest version, by submission id */
  readings: Map<number, ReadingsOfSubmission>;
  marksByGroup: Map<number, number | null>;
}

export interface ReadingsOfSubmission {
  submissionId: number;
  readings: StoredReadings;
  excluded: Exclusion[];
  fileName: string | null;
}

export interface ExportData {
  kind: "course" | "session";
  course: CourseGradebook["course"];
  students: CourseGradebookRow[];
  practicals: PracticalPart[];
  exportedAt: Date;
}

export interface ExportFile {
  body: Uint8Array | string;
  fileName: string;
  contentType: string;
}

// ---------------------------------------------------------------------------------------------
// Sheets

const MARK_FORMAT = "0.00";
const K_FORMAT = "0.0000E+00";

function practicalLabel(p: PracticalPart) {
  return `${p.book.session.title}, ${p.book.session.date}`;
}

/** A student's mark in a practical as the export shows it: empty when missing, 0 only where the course counts missing work as zero and it is due. */
export function shownMark(data: Pick<ExportData, "course">, p: PracticalPart, groupId: number | null): number | null {
  const mark = groupId === null ? null : p.marksByGroup.get(groupId) ?? null;
  if (mark !== null) return mark;
  return data.course.missingCountsAsZero && p.due ? 0 : null;
}

/** The marks sheet's columns; the CSV download is the same table. */
export function marksColumns(data: ExportData): SheetColumn<CourseGradebookRow>[] {
  const columns: SheetColumn<CourseGradebookRow>[] = [
    { header: "Student ID", kind: "text", value: (r) => r.studentId, width: 14 },
    { header: "Name", kind: "text", value: (r) => r.name, width: 28 },
    { header: "E-mail", kind: "text", value: (r) => r.email, width: 32 },
    { header: "Group", kind: "text", value: (r) => r.group, width: 14 },
  ];
  for (const p of data.practicals) {
    columns.push(
      { header: practicalLabel(p), unit: "%", kind: "number", numFmt: MARK_FORMAT, value: (r) => shownMark(data, p, r.groupId), width: 14 },
      { header: `${practicalLabel(p)} released`, kind: "boolean", value: () => p.released, width: 12 },
    );
  }
  if (data.kind === "course") {
    columns.push(
      { header: "Total", unit: "%", kind: "number", numFmt: MARK_FORMAT, value: (r) => r.total, width: 10 },
      { header: "Due practicals missing", kind: "integer", value: (r) => r.missing, width: 12 },
    );
  }
  return columns;
}

const NO_STUDENTS = "No students in this course yet: import the roster on the course's Roster page.";

function practicalsColumns(fitSheets: Map<number, string>): SheetColumn<PracticalPart>[] {
  return [
    { header: "No.", kind: "text", value: (p) => `P${p.n}`, width: 6 },
    { header: "Practical", kind: "text", value: (p) => p.book.session.title, width: 30 },
    { header: "Date", kind: "datetime", numFmt: "yyyy-mm-dd", value: (p) => new Date(`${p.book.session.date}T00:00:00Z`), width: 12 },
    { header: "Status", kind: "text", value: (p) => p.book.session.status, width: 10 },
    { header: "Weight", kind: "number", value: (p) => p.book.session.gradeWeight, width: 8 },
    { header: "Deadline (UTC)", kind: "datetime", value: (p) => (p.book.session.deadline ? new Date(p.book.session.deadline) : null) },
    { header: "Due", kind: "boolean", value: (p) => p.due, width: 8 },
    { header: "Marks released", kind: "boolean", value: (p) => p.released },
    { header: "Released at (UTC)", kind: "datetime", value: (p) => (p.book.session.marksReleasedAt ? new Date(p.book.session.marksReleasedAt) : null) },
    { header: "Groups at benches", kind: "integer", value: (p) => p.book.rows.length },
    { header: "Groups with a mark", kind: "integer", value: (p) => p.book.rows.filter((r) => r.mark !== null).length },
    { header: "Reaction system", kind: "text", value: (p) => p.book.reaction.name, width: 24 },
    { header: "Fit sheet", kind: "text", value: (p) => fitSheets.get(p.n) ?? null, width: 24 },
  ];
}

function kUnit(book: SessionGradebook) {
  return unitText(book.reaction.kUnit);
}

const STATUS_TEXT: Record<string, string> = { queued: "waiting to be marked", marked: "marked", refused: "refused", failed: "marking failed" };

function fitColumns(book: SessionGradebook, readingsSheets: Map<number, string>, readings: Map<number, ReadingsOfSubmission>): SheetColumn<SessionGradebookRow>[] {
  const u = kUnit(book);
  return [
    { header: "Bench", kind: "text", value: (r) => r.bench, width: 8 },
    { header: "Group", kind: "text", value: (r) => r.group, width: 14 },
    { header: "Members", kind: "text", value: (r) => r.members.join(", "), width: 30 },
    { header: "CA0", unit: "mol/L", kind: "number", value: (r) => r.CA0 },
    { header: "CB0", unit: "mol/L", kind: "number", value: (r) => r.CB0 },
    { header: FEED_RATIO_HEADER, kind: "number", numFmt: "0.000", value: (r) => r.feedRatio, width: 10 },
    { header: "T", unit: "°C", kind: "number", value: (r) => r.temperatureC, width: 8 },
    { header: "Status", kind: "text", value: (r) => (r.status ? STATUS_TEXT[r.status] ?? r.status : "nothing uploaded"), width: 16 },
    { header: "Version", kind: "integer", value: (r) => r.version },
    { header: "Submitted at (UTC)", kind: "datetime", value: (r) => (r.submittedAt ? new Date(r.submittedAt) : null) },
    { header: "Late", kind: "boolean", value: (r) => (r.submissionId === null ? null : r.late), width: 7 },
    { header: "Marking k", unit: u, kind: "number", numFmt: K_FORMAT, value: (r) => r.k },
    { header: "k 95 % CI low", unit: u, kind: "number", numFmt: K_FORMAT, value: (r) => r.kCI95?.[0] ?? null },
    { header: "k 95 % CI high", unit: u, kind: "number", numFmt: K_FORMAT, value: (r) => r.kCI95?.[1] ?? null },
    { header: "k standard error", unit: u, kind: "number", numFmt: K_FORMAT, value: (r) => r.kStdErr },
    { header: "Reference k at T", unit: u, kind: "number", numFmt: K_FORMAT, value: (r) => r.kRefAtT },
    { header: "Deviation from reference", unit: "%", kind: "number", numFmt: "0.00", value: (r) => r.deviationPct },
    { header: "Experiment part", unit: "%", kind: "number", numFmt: MARK_FORMAT, value: (r) => r.experimentPart },
    { header: "Analysis part", unit: "%", kind: "number", numFmt: MARK_FORMAT, value: (r) => r.analysisPart },
    { header: "Late penalty", unit: "%", kind: "number", numFmt: MARK_FORMAT, value: (r) => r.latePenalty },
    { header: "Overridden", kind: "boolean", value: (r) => (r.submissionId === null ? null : r.overridden), width: 11 },
    { header: "Override reason", kind: "text", value: (r) => r.overrideReason, width: 30 },
    { header: "Mark", unit: "%", kind: "number", numFmt: MARK_FORMAT, value: (r) => r.mark, width: 10 },
    { header: "Flags", kind: "text", value: (r) => (r.flags.length ? r.flags.join(", ") : null), width: 24 },
    { header: "Review", kind: "text", value: (r) => r.reviewState, width: 10 },
    { header: "Readings sheet", kind: "text", value: (r) => (r.submissionId !== null ? readingsSheets.get(r.submissionId) ?? null : null), width: 16 },
    { header: "Original file", kind: "text", value: (r) => (r.submissionId !== null ? readings.get(r.submissionId)?.fileName ?? null : null), width: 24 },
  ];
}

interface ReadingLine {
  row: number;
  t: number;
  value: number;
  leftOut: string | null;
}

/** The file's header for a column, with its unit added when the header does not show it (e.g. clock times read as seconds). */
function readingsHeader(c: StoredReadings["time"], fallback: string): { header: string; unit?: string } {
  const header = c.header || `${fallback} (column ${c.letter})`;
  return c.unit && !header.includes(c.unit) ? { header, unit: c.unit } : { header };
}

function readingsColumns(r: StoredReadings): SheetColumn<ReadingLine>[] {
  return [
    { header: "Row in file", kind: "integer", value: (l) => l.row, width: 11 },
    { ...readingsHeader(r.time, "time"), kind: "number", value: (l) => l.t, width: 14 },
    { ...readingsHeader(r.value, "value"), kind: "number", value: (l) => l.value, width: 16 },
    { header: "Left out of the fit", kind: "text", value: (l) => l.leftOut, width: 28 },
  ];
}

function readingLines(r: ReadingsOfSubmission): ReadingLine[] {
  const leftOut = new Map(r.excluded.map((e) => [e.row, e.reason]));
  return r.readings.points.map(([t, value], i) => {
    const row = r.readings.rowNumbers[i];
    return { row, t, value, leftOut: leftOut.get(row) ?? null };
  });
}

const columnText = (c: StoredReadings["time"]) => `${c.letter}${c.header ? ` “${c.header}”` : ""}${c.unit ? `, unit ${c.unit}` : ""}`;

function readingsAside(p: PracticalPart, row: SessionGradebookRow, r: ReadingsOfSubmission): Array<[string, CellValue]> {
  return [
    ["Practical", `P${p.n} ${p.book.session.title}`],
    ["Group", row.group],
    ["Members", row.members.join(", ")],
    ["Bench", row.bench],
    ["Version", row.version],
    ["Submitted at (UTC)", row.submittedAt ? new Date(row.submittedAt) : null],
    ["Original file", r.fileName ?? "(not kept)"],
    ["Time column", columnText(r.readings.time)],
    ["Value column", columnText(r.readings.value)],
    ["Readings", r.readings.points.length],
    ...r.readings.notes.map((note, i): [string, CellValue] => [i === 0 ? "Notes" : "", note]),
  ];
}

function emptyFitNote(book: SessionGradebook) {
  return book.rows.length
    ? `Nothing uploaded yet: none of the ${book.rows.length} group(s) at a bench has sent readings for this practical.`
    : "Nothing uploaded yet: no group has a bench in this practical.";
}

/** The workbook of an export. */
export async function exportWorkbook(data: ExportData): Promise<Uint8Array> {
  const wb = newWorkbook(`${data.course.code} marks`);
  const used = new Set<string>();

  // Names first (the practicals sheet and each fit sheet name the sheets they point to).
  const marksName = sheetName("Marks", used);
  const practicalsName = sheetName("Practicals", used);
  const fitSheets = new Map<number, string>();
  const readingsSheets = new Map<number, Map<number, string>>();
  for (const p of data.practicals) {
    fitSheets.set(p.n, sheetName(`P${p.n} ${p.book.session.title}`, used));
    const names = new Map<number, string>();
    for (const row of p.book.rows) {
      if (row.submissionId !== null && p.readings.has(row.submissionId)) names.set(row.submissionId, sheetName(`P${p.n} ${row.group}`, used));
    }
    readingsSheets.set(p.n, names);
  }

  addTableSheet(wb, used, marksName, marksColumns(data), data.students, { reservedName: true, emptyNote: NO_STUDENTS });
  addTableSheet(wb, used, practicalsName, practicalsColumns(fitSheets), data.practicals, {
    reservedName: true,
    emptyNote: "No practical yet (drafts are left out until they are planned).",
    aside: [
      ["Course", `${data.course.code} ${data.course.title}`],
      ["Term", data.course.term || null],
      ["Exported at (UTC)", data.exportedAt],
      ["Marks", "percent of each practical's marks; the total is the mean weighted by the practicals' weights"],
      ["Missing work", data.course.missingCountsAsZero ? "counts as zero once a practical is due" : "left out of the total (empty cell)"],
    ],
  });

  for (const p of data.practicals) {
    const sheets = readingsSheets.get(p.n)!;
    const uploaded = p.book.rows.filter((r) => r.submissionId !== null);
    const { reaction } = p.book;
    addTableSheet(wb, used, fitSheets.get(p.n)!, fitColumns(p.book, sheets, p.readings), uploaded.length ? p.book.rows : [], {
      reservedName: true,
      emptyNote: emptyFitNote(p.book),
      aside: [
        ["Practical", p.book.session.title],
        ["Date", new Date(`${p.book.session.date}T00:00:00Z`)],
        ["Reaction system", reaction.name],
        [`Reference k at ${reaction.TrefC} °C (${kUnit(p.book)})`, reaction.kRef],
        ["Activation energy (kJ/mol)", reaction.EaKJ],
        ["Measured", reaction.measured],
      ],
    });
    for (const row of p.book.rows) {
      const r = row.submissionId !== null ? p.readings.get(row.submissionId) : undefined;
      if (!r) continue;
      addTableSheet(wb, used, sheets.get(row.submissionId!)!, readingsColumns(r.readings), readingLines(r), {
        reservedName: true,
        emptyNote: "The file had no readings that could be used.",
        aside: readingsAside(p, row, r),
      });
    }
  }
  return workbookBytes(wb);
}

function namesOf(data: ExportData) {
  const parts = [data.course.code];
  if (data.kind === "session") parts.push(data.practicals[0].book.session.title);
  return parts;
}

export async function exportFile(data: ExportData, format: "xlsx" | "csv"): Promise<ExportFile> {
  if (format === "csv") {
    return {
      body: toCsv(marksColumns(data), data.students, NO_STUDENTS),
      fileName: downloadName([...namesOf(data), "marks"], data.exportedAt, "csv"),
      contentType: CSV_TYPE,
    };
  }
  return { body: await exportWorkbook(data), fileName: downloadName(namesOf(data), data.exportedAt, "xlsx"), contentType: XLSX_TYPE };
}

