import { data, Form, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/new";
import { requireUser } from "~/.server/guards.server";
import { createCourse } from "~/.server/courses.server";
import { Button, Field } from "~/components/form";
import { PageTitle } from "~/components/page";
import { readForm } from "~/.server/body.server";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "New course · Ratebook" }];
const STAFF = ["admin", "course-creator"] as const;

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, { roles: STAFF });
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, { roles: STAFF });
  const form = await readForm(request);
  const input = { code: form.get("code"), title: form.get("title"), term: form.get("term") };
  const result = await createCourse(user, input);
  if (!result.ok) return data({ errors: result.errors, values: Object.fromEntries(form) as Record<string, string> }, { status: 400 });
  return redirect(`/courses/${result.value.id}`);
}

export default function CourseNew({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errors = actionData?.errors ?? {};
  const values = actionData?.values ?? {};
  return (
    <div className="max-w-lg">
      <PageTitle trail={trailFor("New course")} sub="You become its first instructor.">New course</PageTitle>
      <Form method="post" noValidate>
        <Field label="Code" name="code" defaultValue={values.code} error={errors.code} hint="Short, e.g. KIN-201" />
        <Field label="Title" name="title" defaultValue={values.title} error={errors.title} />
        <Field label="Term" name="term" defaultValue={values.term} error={errors.term} hint="Optional, e.g. Spring 2027" />
        <Button busy={busy}>Create course</Button>
      </Form>
    </div>
  );
}
