// Copy a practical (to this course or another the person teaches, e.g. next term's) with its
// reaction system, set-up, rubric and bench design; the lab day is chosen, the deadline moves with it.
import { data, Form, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/copy";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { readForm } from "~/.server/body.server";
import { sessionAccess } from "~/.server/planning/sessions.server";
import { Bench } from "~/.server/db/lab-sessions.server";
import { copyPractical, copyTargets } from "~/.server/planning/reuse.server";
import { Button, Field, FormMessage, SelectField } from "~/components/form";
import { PageTitle } from "~/components/page";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Copy ${data?.practical.title ?? "practical"} · Ratebook` }];

async function instructorAccess(request: Request, rawId: string | undefined) {
  const user = await requireUser(request);
  // the source is only read (an archived course's practical may be copied); reuse.server refuses archived targets
  const access = await sessionAccess(user, pathId(rawId), false, { whileArchived: true });
  if (access.role !== "instructor") throw data({ message: "Only the course's instructors copy a practical." }, { status: 403 });
  return { user, access };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, access } = await instructorAccess(request, params.sessionId);
  const { session, course, reaction } = access;
  return {
    practical: { id: session.id, title: session.title, date: session.date, benches: await Bench.count({ where: { sessionId: session.id } }) },
    course: { id: course.id, code: course.code },
    reaction: reaction.name,
    targets: await copyTargets(user),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { user, access } = await instructorAccess(request, params.sessionId);
  const form = await readForm(request);
  const result = await copyPractical(user, access.session, { courseId: form.get("courseId"), date: form.get("date"), title: form.get("title") });
  if (!result.ok) return data({ errors: result.errors, values: Object.fromEntries(form) as Record<string, string> }, { status: 400 });
  return redirect(`/sessions/${result.value.id}?copied=${access.session.id}`);
}

export default function CopyPractical({ loaderData, actionData }: Route.ComponentProps) {
  const { practical, course, reaction, targets } = loaderData;
  const busy = useNavigation().state === "submitting";
  const errors = actionData?.errors ?? {};
  const values = actionData?.values ?? {};
  const label = (t: (typeof targets)[number]) => `${t.code}${t.term ? ` (${t.term})` : ""}: ${t.title}`;
  return (
    <div className="max-w-xl">
      <PageTitle trail={trailFor("Copy", course, practical)} sub={`Lab day ${practical.date} · ${reaction} · ${practical.benches} bench${practical.benches === 1 ? "" : "es"}`}>Copy this practical</PageTitle>
      <p className="mb-4">
        The copy keeps the reaction system, the set-up, the rubric and every bench's feed and temperature. It starts with no groups on its
        benches and nobody told; uploads and marks stay with this practical. The deadline keeps its distance from the lab day.
      </p>
      {errors.form ? <FormMessage tone="error">{errors.form}</FormMessage> : null}
      <Form method="post" noValidate>
        <SelectField
          label="Copy into the course"
          name="courseId"
          options={targets.map((t) => String(t.id))}
          labels={Object.fromEntries(targets.map((t) => [String(t.id), label(t)]))}
          defaultValue={values.courseId ?? String(course.id)}
          error={errors.courseId}
        />
        <Field label="Title" name="title" defaultValue={values.title ?? practical.title} error={errors.title} />
        <Field label="Lab day" name="date" type="date" defaultValue={values.date ?? practical.date} error={errors.date} hint="YYYY-MM-DD" />
        <Button busy={busy}>Make the copy</Button>
      </Form>
    </div>
  );
}
