// Copy a course to a new term: its staff, reaction systems and practicals (benches, rubrics,
// dates moved), without students, groups, uploads or marks.
import { data, Form, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/copy";
import { requireCourseFromPath } from "~/.server/guards.server";
import { readForm } from "~/.server/body.server";
import { LabSession } from "~/.server/db/lab-sessions.server";
import { copyCourse } from "~/.server/planning/reuse.server";
import { Button, Field, FormMessage } from "~/components/form";
import { PageTitle } from "~/components/page";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Copy ${data?.course.code ?? "course"} to a new term · Ratebook` }];
const MAY_CREATE = ["admin", "course-creator"];

async function copier(request: Request, rawId: string | undefined) {
  // copying reads this course and writes a new one, so an archived course may be copied
  const found = await requireCourseFromPath(request, rawId, ["instructor"], { whileArchived: true });
  if (!MAY_CREATE.includes(found.user.role)) throw data({ message: "Copying a course makes a new course: your account cannot create courses. Ask an administrator." }, { status: 403 });
  return found;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await copier(request, params.courseId);
  const practicals = await LabSession.findAll({ where: { courseId: course.id }, attributes: ["id", "title", "date"], order: [["date", "ASC"], ["id", "ASC"]] });
  return {
    course: { id: course.id, code: course.code, title: course.title, term: course.term },
    practicals: practicals.map((p) => ({ id: p.id, title: p.title, date: p.date })),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { user, course } = await copier(request, params.courseId);
  const form = await readForm(request);
  const result = await copyCourse(user, course, { term: form.get("term"), title: form.get("title"), firstDate: form.get("firstDate") });
  if (!result.ok) return data({ errors: result.errors, values: Object.fromEntries(form) as Record<string, string> }, { status: 400 });
  return redirect(`/courses/${result.value.id}`);
}

export default function CopyCourse({ loaderData, actionData }: Route.ComponentProps) {
  const { course, practicals } = loaderData;
  const busy = useNavigation().state === "submitting";
  const errors = actionData?.errors ?? {};
  const values = actionData?.values ?? {};
  return (
    <div className="max-w-xl">
      <PageTitle trail={trailFor("Copy to a new term", course)} sub={`${course.title}${course.term ? ` · ${course.term}` : ""}`}>Copy {course.code} to a new term</PageTitle>
      <p className="mb-4">
        The new course has the same code, this course's instructors and demonstrators, its reaction systems and its {practicals.length} practical
        {practicals.length === 1 ? "" : "s"} with their benches and rubrics. Students, groups, uploads and marks stay here.
      </p>
      {errors.form ? <FormMessage tone="error">{errors.form}</FormMessage> : null}
      <Form method="post" noValidate>
        <Field label="New term" name="term" defaultValue={values.term} error={errors.term ?? errors.code} hint="e.g. Spring 2027" />
        <Field label="Title" name="title" defaultValue={values.title ?? course.title} error={errors.title} />
        {practicals.length ? (
          <Field
            label="Lab day of the first practical"
            name="firstDate"
            type="date"
            defaultValue={values.firstDate ?? practicals[0].date}
            error={errors.firstDate}
            hint={`Now ${practicals[0].date} (${practicals[0].title}); the others keep their spacing. YYYY-MM-DD`}
          />
        ) : null}
        <Button busy={busy}>Make the new course</Button>
      </Form>
    </div>
  );
}
