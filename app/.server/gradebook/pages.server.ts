// What the two gradebook pages load and how the course page's settings form is read. The pages
// show the same figures as the JSON API (sessionGradebook / courseGradebook), trimmed to what the
// table draws, with the caller's remembered view of the table.
import { data } from "react-router";
import { z } from "zod";
import { parseWithZod } from "@conform-to/zod/v4";
import type { User } from "../db/models.server";
import { parseId } from "../ids.server";
import { requireCourseGradebook, requireSessionGradebook } from "./access.server";
import { sessionGradebook } from "./session.server";
import { courseGradebook } from "./course.server";
import { GradeSettingsProblem, saveGradeSettings } from "./settings.server";
import { tableView } from "./table-views.server";

export async function sessionGradebookPage(user: User, rawId: string | undefined) {
  const id = parseId(rawId);
  if (id === null) throw data({ message: "There is no practical at this address." }, { status: 404 });
  const { version } = await requireSessionGradebook(user, id, false);
  const [book, view] = await Promise.all([sessionGradebook(id, version), tableView(user.id, "session-gradebook")]);
  if (!book) throw data({ message: "There is no practical at this address." }, { status: 404 });
  return { ...book, kUnit: book.reaction.kUnit, view };
}

/** One row of the course table as the page draws it (no e-mail, no ids it does not use). */
export interface CoursePageRow {
  id: number;
  studentId: string | null;
  name: string;
  group: string | null;
  marks: Record<string, number | null>;
  total: number | null;
  missing: number;
}

export async function courseGradebookPage(user: User, rawId: string | undefined) {
  const { courseId: id, version, archived, instructor } = await requireCourseGradebook(user, parseId(rawId), false);
  const [book, view] = await Promise.all([courseGradebook(id, version), tableView(user.id, "course-gradebook")]);
  if (!book) throw data({ message: "There is no course at this address." }, { status: 404 });
  const rows: CoursePageRow[] = book.rows.map((r) => ({
    id: r.userId, studentId: r.studentId, name: r.name, group: r.group, marks: r.marks, total: r.total, missing: r.missing,
  }));
  return {
    course: book.course,
    sessions: book.sessions,
    rows,
    view,
    /** instructors (and admins) change the weights and the missing-work rule; demonstrators read */
    canEdit: instructor && !archived,
    archived,
  };
}

export const WEIGHT_FIELD = (sessionId: number) => `weight-${sessionId}`;

const weight = z
  .number({ error: "Give a weight: a number from 0 to 1000 (a point for decimals)." })
  .min(0, { error: "A weight cannot be below 0 (0 leaves the practical out of the total)." })
  .max(1000, { error: "A weight is at most 1000." });

function settingsSchema(sessionIds: number[]) {
  return z.object({
    missingCountsAsZero: z.boolean().default(false),
    ...Object.fromEntries(sessionIds.map((id) => [WEIGHT_FIELD(id), weight])),
  });
}

/** The course page's settings form: check it, save it (audited) or answer with each field's message. */
export async function saveCourseGradeSettings(user: User, rawId: string | undefined, form: FormData) {
  const { courseId: id, version, archived, instructor } = await requireCourseGradebook(user, parseId(rawId), false);
  if (!instructor) throw data({ message: "Only the course's instructors change how the total is made." }, { status: 403 });
  const book = await courseGradebook(id, version);
  const sessionIds = book!.sessions.map((s) => s.id);
  const submission = parseWithZod(form, { schema: settingsSchema(sessionIds) });
  if (archived) return { status: 400, result: submission.reply({ formErrors: ["This course is archived; take it out of the archive before changing it."] }) };
  if (submission.status !== "success") return { status: 400, result: submission.reply() };
  const value = submission.value as Record<string, number | boolean>;
  const weights = Object.fromEntries(sessionIds.map((s) => [s, value[WEIGHT_FIELD(s)] as number]));
  try {
    await saveGradeSettings(user, id, { missingCountsAsZero: value.missingCountsAsZero === true, weights });
  } catch (error) {
    if (!(error instanceof GradeSettingsProblem)) throw error;
    const field = error.field === "course" ? "" : error.field;
    return { status: 400, result: submission.reply(field ? { fieldErrors: { [field]: [error.message] } } : { formErrors: [error.message] }) };
  }
  return { status: 200, result: submission.reply(), saved: true };
}
