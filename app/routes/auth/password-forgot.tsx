import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/password-forgot";
import { requestPasswordReset, type FieldErrors } from "~/.server/people.server";
import { Button, Field, FormMessage } from "~/components/form";
import { NarrowPage } from "~/components/page";
import { readForm } from "~/.server/body.server";
import { resetRequestLimit } from "~/.server/throttle.server";
import { emailProblem, normaliseEmail } from "~/lib/email-address";

export const meta: Route.MetaFunction = () => [{ title: "Reset password · Ratebook" }];

export async function action({ request }: Route.ActionArgs) {
  const form = await readForm(request);
  const email = String(form.get("email") ?? "");
  // The form's own check first (it depends on the text alone), then the limits, the same way for
  // every address (so neither tells whether an account exists), then one job either way.
  const badEmail = emailProblem(normaliseEmail(email));
  if (badEmail) return data({ sent: false, errors: { email: badEmail } as FieldErrors, email }, { status: 400 });
  const limited = await resetRequestLimit(request, email);
  if (limited) return data({ sent: false, errors: { form: limited.message } as FieldErrors, email }, { status: 429, headers: { "Retry-After": String(limited.retryAfterS) } });
  const result = await requestPasswordReset(email);
  const errors: FieldErrors = result.ok ? {} : result.errors;
  return data({ sent: result.ok, errors, email }, { status: result.ok ? 200 : 400 });
}

export default function PasswordForgot({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  if (actionData?.sent) {
    return (
      <NarrowPage title="Check your e-mail">
        <FormMessage tone="info">
          If {actionData.email} belongs to a Ratebook account, a link to choose a new password is on its way. It works once and for one hour.
        </FormMessage>
        <Link className="text-accent underline" to="/sign-in">Back to sign-in</Link>
      </NarrowPage>
    );
  }
  return (
    <NarrowPage title="Reset your password">
      <p className="mb-6">Enter the e-mail you sign in with. We will send a link to choose a new password.</p>
      {actionData?.errors.form ? <FormMessage tone="error">{actionData.errors.form}</FormMessage> : null}
      <Form method="post" noValidate>
        <Field label="E-mail" name="email" type="email" autoComplete="username" defaultValue={actionData?.email} error={actionData?.errors.email} />
        <Button busy={busy}>Send the link</Button>
      </Form>
      <p className="mt-6"><Link className="text-accent underline" to="/sign-in">Back to sign-in</Link></p>
    </NarrowPage>
  );
}
