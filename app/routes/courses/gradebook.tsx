// A course's gradebook for its instructors and demonstrators: a row per student, each
// practical's mark and the weighted total; instructors set how the total is made.
import { Link, data, type ShouldRevalidateFunctionArgs } from "react-router";
import type { Route } from "./+types/gradebook";
import { requireUser } from "~/.server/guards.server";
import { readForm } from "~/.server/body.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { courseGradebookPage, saveCourseGradeSettings } from "~/.server/gradebook/pages.server";
import { PageTitle } from "~/components/page";
import { CourseGradebookTable } from "~/components/gradebook/course-table";
import { GradeSettings } from "~/components/gradebook/grade-settings";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Gradebook${data ? `: ${data.course.code}` : ""} · Ratebook` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(false, async () => courseGradebookPage(await requireUser(request), params.courseId));
}

export async function action({ request, params }: Route.ActionArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const form = await readForm(request);
    const { status, ...reply } = await saveCourseGradeSettings(user, params.courseId, form);
    return data(reply, { status });
  });
}

/** Saving the table view changes nothing the page loaded. */
export function shouldRevalidate({ formAction, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  return formAction?.startsWith("/api/table-views/") ? false : defaultShouldRevalidate;
}

export default function CourseGradebook({ loaderData, actionData }: Route.ComponentProps) {
  const { course, sessions, rows, view, canEdit, archived } = loaderData;
  const missingStudents = rows.filter((r) => r.missing > 0).length;
  return (
    <>
      <PageTitle trail={trailFor("Gradebook", course)} sub={<>{course.title}{course.term ? ` · ${course.term}` : ""}</>}>
        Gradebook: {course.code}
      </PageTitle>
      <nav aria-label="Downloads" className="mb-4 flex flex-wrap gap-2">
        {/* plain links: downloads are resource routes, not pages for the router to load */}
        <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/courses/${course.id}/export.xlsx`} download>Download workbook (.xlsx)</a>
        <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/courses/${course.id}/export.csv`} download>Marks (.csv)</a>
      </nav>
      <p className="mb-1">
        {rows.length} {rows.length === 1 ? "student" : "students"} · {sessions.length} {sessions.length === 1 ? "practical" : "practicals"} · {missingStudents} with missing work
      </p>
      <p className="mb-4 text-sm text-ink-soft">
        Each mark is the student's group's latest version. <span aria-hidden="true">—</span> missing (due, no mark){course.missingCountsAsZero ? ", counted as 0 in the total" : ", left out of the total"}; “not yet due”: the practical is still open.
        {sessions.length ? <> Practicals: {sessions.map((s, i) => <span key={s.id}>{i ? ", " : ""}<Link className="underline" to={`/sessions/${s.id}/gradebook`}>{s.title}</Link></span>)}.</> : null}
      </p>
      <CourseGradebookTable sessions={sessions} missingCountsAsZero={course.missingCountsAsZero} rows={rows} initialView={view} />
      <GradeSettings
        sessions={sessions}
        missingCountsAsZero={course.missingCountsAsZero}
        canEdit={canEdit}
        archived={archived}
        result={actionData?.result}
        saved={actionData !== undefined && "saved" in actionData && actionData.saved === true}
      />
    </>
  );
}
