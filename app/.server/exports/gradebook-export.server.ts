// The gradebook downloads: one .xlsx for a course (every practical that is not a draft) or for one
// practical, and the CSV of its marks sheet. The workbook holds
//   - "Marks": a row per student (student ID, name, e-mail, group, each practical's mark and
//     whether it is released, the course total), the table to paste into a records system;
//   - "Practicals": each practical's date, weight, due and released, and the course's settings;
//   - a sheet per practical with each group's fit (bench, feed, temperature, marking k with its
//     95 % interval and standard error, the reference k at T, deviation, parts, late, override,
//     mark, flags, status, version);
//   - a sheet per group and practical with the readings as they were read from the uploaded file
//     (its own headers and units, the row numbers in the file, the file's name).
// Figures come from the gradebook services (the same numbers as the gradebook pages and the API);
// the sheets are built with the building blocks in workbook.server.ts (numbers as numbers, no
// formulas, frozen headers, widths). Staff only: the routes check the caller first.
import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import { whileDatabaseUp } from "../db/unavailable.server";
import { requireUser } from "../guards.server";
import { parseId } from "../ids.server";
import { requireCourseGradebook, requireSessionGradebook } from "../gradebook/access.server";
import type { Exclusion, StoredReadings } from "../db/submissions.server";
import { courseGradebook } from "../gradebook/course.server";
import { sessionGradebook, type SessionGradebook } from "../gradebook/session.server";
import { courseVersion } from "../gradebook/cache.server";
import { downloadResponse } from "./workbook.server";
import { countingOrder } from "../gradebook/counting.server";
import { compute } from "../compute/pool.server";
import type { ExportData, ExportFile, PracticalPart, ReadingsOfSubmission } from "./gradebook-sheets.server";

export { exportWorkbook, marksColumns, shownMark, type ExportData, type ExportFile } from "./gradebook-sheets.server";

// The version that counts of each group in each practical (as the gradebook counts it), with what was
// read from its file; the file's bytes stay in the database.
const READINGS = `
select distinct on (s.session_id, s.group_id) s.id, s.readings, s.excluded, f.original_name
  from submissions s
  left join submission_files f on f.submission_id = s.id
 where s.session_id = any($1::int[])
 order by s.session_id, s.group_id, ${countingOrder("s")}`;

async function readingsOf(sessionIds: number[]): Promise<Map<number, ReadingsOfSubmission>> {
  const out = new Map<number, ReadingsOfSubmission>();
  if (!sessionIds.length) return out;
  const rows = await getSequelize().query<{ id: number; readings: StoredReadings | null; excluded: Exclusion[] | null; original_name: string | null }>(
    READINGS, { bind: [sessionIds], type: QueryTypes.SELECT },
  );
  for (const r of rows) {
    if (r.readings && Array.isArray(r.readings.points)) out.set(r.id, { submissionId: r.id, readings: r.readings, excluded: r.excluded ?? [], fileName: r.original_name });
  }
  return out;
}

function part(n: number, book: SessionGradebook, due: boolean, readings: Map<number, ReadingsOfSubmission>): PracticalPart {
  return {
    n, book, due, released: book.session.marksReleasedAt !== null, readings,
    marksByGroup: new Map(book.rows.map((r) => [r.groupId, r.mark])),
  };
}

/**
 * Everything a course export shows, or null when there is no such course. The gradebooks are the
 * ones kept for the course's version (pass it when the access check has just read it).
 */
export async function courseExportData(courseId: number, version?: string, now = new Date()): Promise<ExportData | null> {
  const course = await courseGradebook(courseId, version);
  if (!course) return null;
  const ids = course.sessions.map((s) => s.id);
  // Every practical is of this course: the course's version holds for each of them.
  const at = version ?? (await courseVersion(courseId));
  const [books, readings] = await Promise.all([Promise.all(ids.map((id) => sessionGradebook(id, at))), readingsOf(ids)]);
  const practicals = course.sessions.map((s, i) => part(i + 1, books[i]!, s.due, readings));
  return { kind: "course", course: course.course, students: course.rows, practicals, exportedAt: now };
}

/** Everything a practical's export shows (its course's students, this practical only), or null. */
export async function sessionExportData(sessionId: number, version?: string, now = new Date()): Promise<ExportData | null> {
  const book = await sessionGradebook(sessionId, version);
  if (!book) return null;
  const [course, readings] = await Promise.all([courseGradebook(book.session.courseId, version), readingsOf([sessionId])]);
  // A draft is never due (the course gradebook leaves drafts out).
  const due = course!.sessions.find((s) => s.id === sessionId)?.due ?? false;
  return { kind: "session", course: course!.course, students: course!.rows, practicals: [part(1, book, due, readings)], exportedAt: now };
}

/** The file of an export, built in the compute pool (a course workbook takes seconds of CPU). */
export function exportFile(data: ExportData, format: "xlsx" | "csv"): Promise<ExportFile> {
  return compute("exportFile", { data, format });
}

// ---------------------------------------------------------------------------------------------
// Downloads

/**
 * The answer to GET /sessions/:id/export.(xlsx|csv) and /courses/:id/export.(xlsx|csv). They
 * answer as the other downloads and the JSON API do (e.g. /api/submissions/:id/original): a
 * signed-out request, or one whose Bearer token is revoked, expired or unknown, gets 401 JSON
 * (never a sign-in page: scripts fetch these); a student 403; an unknown id 404.
 */
export function exportDownload(request: Request, kind: "session" | "course", rawId: string | undefined, format: "xlsx" | "csv"): Promise<Response> {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    let data: ExportData | null;
    if (kind === "course") {
      const { courseId, version } = await requireCourseGradebook(user, parseId(rawId), true);
      data = await courseExportData(courseId, version);
    } else {
      const id = parseId(rawId);
      const { version } = await requireSessionGradebook(user, id, true);
      data = await sessionExportData(id!, version);
    }
    if (!data) return Response.json({ error: `There is no ${kind === "course" ? "course" : "practical"} with this id.` }, { status: 404 });
    const file = await exportFile(data, format);
    return downloadResponse(file.body, file.fileName, file.contentType);
  });
}
