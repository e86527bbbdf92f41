import { data, Form, useNavigation } from "react-router";
import type { Route } from "./+types/account";
import { requireUser } from "~/.server/guards.server";
import { changeOwnPassword, type FieldErrors } from "~/.server/people.server";
import { MIN_PASSWORD_LENGTH } from "~/.server/passwords.server";
import { Button, Field, FormMessage } from "~/components/form";
import { PageTitle } from "~/components/page";

export const meta: Route.MetaFunction = () => [{ title: "Your account · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { name: user.displayName, email: user.email, role: user.role, minLength: MIN_PASSWORD_LENGTH };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  const result = await changeOwnPassword(user, { current: form.get("current"), password: form.get("password"), confirm: form.get("confirm") });
  const errors: FieldErrors = result.ok ? {} : result.errors;
  return data({ changed: result.ok, errors }, { status: result.ok ? 200 : 400 });
}

export default function Account({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errors = actionData?.errors ?? {};
  return (
    <div className="max-w-lg">
      <PageTitle sub={`${loaderData.email} · ${loaderData.role}`}>{loaderData.name}</PageTitle>
      <h2 className="mb-3 text-xl font-bold">Change your password</h2>
      {actionData?.changed ? <FormMessage tone="info">Your password is changed. Use the new one next time you sign in.</FormMessage> : null}
      <Form method="post" noValidate key={actionData?.changed ? "done" : "form"}>
        <Field label="Current password" name="current" type="password" autoComplete="current-password" error={errors.current} />
        <Field label="New password" name="password" type="password" autoComplete="new-password" hint={`At least ${loaderData.minLength} characters.`} error={errors.password} />
        <Field label="New password again" name="confirm" type="password" autoComplete="new-password" />
        <Button busy={busy}>Change password</Button>
      </Form>
    </div>
  );
}
