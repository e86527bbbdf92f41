import { data, Form, Link, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/password-reset";
import { checkToken } from "~/.server/tokens.server";
import { resetPassword } from "~/.server/people.server";
import { MIN_PASSWORD_LENGTH } from "~/.server/passwords.server";
import { Button, Field, FormMessage } from "~/components/form";
import { NarrowPage } from "~/components/page";
import { readForm } from "~/.server/body.server";

export const meta: Route.MetaFunction = () => [{ title: "Choose a new password · Ratebook" }];

export async function loader({ params }: Route.LoaderArgs) {
  const check = await checkToken(params.token, "password-reset");
  if (!check.ok) return { valid: false as const, message: check.message };
  return { valid: true as const, email: check.user.email, minLength: MIN_PASSWORD_LENGTH };
}

export async function action({ request, params }: Route.ActionArgs) {
  const form = await readForm(request);
  const result = await resetPassword(params.token, { password: form.get("password"), confirm: form.get("confirm") });
  if (!result.ok) return data({ errors: result.errors }, { status: 400 });
  return redirect("/sign-in?reset=1");
}

export default function PasswordReset({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  if (!loaderData.valid) {
    return (
      <NarrowPage title="Reset link">
        <FormMessage tone="error">{loaderData.message}</FormMessage>
        <Link className="text-accent underline" to="/password/forgot">Ask for a new link</Link>
      </NarrowPage>
    );
  }
  const errors = actionData?.errors ?? {};
  return (
    <NarrowPage title="Choose a new password">
      <p className="mb-6">For <strong>{loaderData.email}</strong>.</p>
      {errors.form ? <FormMessage tone="error">{errors.form}</FormMessage> : null}
      <Form method="post" noValidate>
        <Field label="New password" name="password" type="password" autoComplete="new-password" hint={`At least ${loaderData.minLength} characters.`} error={errors.password} />
        <Field label="New password again" name="confirm" type="password" autoComplete="new-password" />
        <Button busy={busy}>Change password</Button>
      </Form>
    </NarrowPage>
  );
}
