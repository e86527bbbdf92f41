import { data, Form, Link, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/invitation";
import { checkToken } from "~/.server/tokens.server";
import { acceptInvitation } from "~/.server/people.server";
import { startSession } from "~/.server/session.server";
import { Button, Field, FormMessage } from "~/components/form";
import { NarrowPage } from "~/components/page";
import { MIN_PASSWORD_LENGTH } from "~/.server/passwords.server";
import { readForm } from "~/.server/body.server";
import { courseRequiringSso } from "~/.server/sso/accounts.server";

export const meta: Route.MetaFunction = () => [{ title: "Accept invitation · Ratebook" }];

export async function loader({ params }: Route.LoaderArgs) {
  const check = await checkToken(params.token, "invitation");
  if (!check.ok) return { valid: false as const, message: check.message };
  return { valid: true as const, email: check.user.email, displayName: check.user.displayName, minLength: MIN_PASSWORD_LENGTH };
}

export async function action({ request, params }: Route.ActionArgs) {
  const form = await readForm(request);
  const result = await acceptInvitation(params.token, {
    password: form.get("password"),
    confirm: form.get("confirm"),
    displayName: form.get("displayName"),
  });
  if (!result.ok) return data({ errors: result.errors, displayName: String(form.get("displayName") ?? "") }, { status: 400 });
  // A student of a course that asks for the institution's sign-in is sent there instead.
  if (await courseRequiringSso(result.value.id)) throw redirect("/sign-in?sso=required");
  return startSession(result.value.id, "/dashboard", request);
}

export default function Invitation({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  if (!loaderData.valid) {
    return (
      <NarrowPage title="Invitation">
        <FormMessage tone="error">{loaderData.message}</FormMessage>
        <Link className="text-accent underline" to="/sign-in">Go to sign-in</Link>
      </NarrowPage>
    );
  }
  const errors = actionData?.errors ?? {};
  return (
    <NarrowPage title="Welcome to Ratebook">
      <p className="mb-6">Choose a password for <strong>{loaderData.email}</strong>. You will use it with this e-mail to sign in.</p>
      {errors.form ? <FormMessage tone="error">{errors.form}</FormMessage> : null}
      <Form method="post" noValidate>
        <Field label="Your name" name="displayName" defaultValue={actionData?.displayName ?? loaderData.displayName} error={errors.displayName} autoComplete="name" />
        <Field label="Password" name="password" type="password" autoComplete="new-password" hint={`At least ${loaderData.minLength} characters.`} error={errors.password} />
        <Field label="Password again" name="confirm" type="password" autoComplete="new-password" />
        <Button busy={busy}>Set password and sign in</Button>
      </Form>
    </NarrowPage>
  );
}
