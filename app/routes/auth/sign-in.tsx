import { data, Form, Link, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/sign-in";
import { authenticator, SignInError, SignInThrottled } from "~/.server/auth.server";
import { rememberAccount } from "~/.server/throttle.server";
import { currentUser, safeReturnTo } from "~/.server/guards.server";
import { startSession } from "~/.server/session.server";
import { Button, Field, FormMessage } from "~/components/form";
import { NarrowPage } from "~/components/page";
import { readForm, withFormBody } from "~/.server/body.server";
import { ssoConfig } from "~/.server/sso/oidc.server";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const returnTo = safeReturnTo(url.searchParams.get("returnTo"));
  if (await currentUser(request)) throw redirect(returnTo);
  const sso = ssoConfig();
  return {
    returnTo,
    reset: url.searchParams.get("reset") === "1",
    ssoRequired: url.searchParams.get("sso") === "required",
    sso: sso ? { label: sso.label } : null,
  };
}

export async function action({ request }: Route.ActionArgs) {
  // Read the body once, within the limit; authenticate() gets a copy to read again.
  const form = await readForm(request);
  const email = String(form.get("email") ?? "");
  const returnTo = safeReturnTo(form.get("returnTo"));
  try {
    const user = await authenticator.authenticate("form", withFormBody(request, form));
    const res = await startSession(user.id, returnTo, request);
    // This browser now knows the account: others' failed guesses no longer hold it back.
    res.headers.append("Set-Cookie", await rememberAccount(request, user.id));
    return res;
  } catch (error) {
    if (error instanceof SignInThrottled) {
      return data({ error: error.message, field: error.field, email }, { status: 429, headers: { "Retry-After": String(error.retryAfterS) } });
    }
    if (error instanceof SignInError) {
      return data({ error: error.message, field: error.field, email }, { status: 400 });
    }
    throw error;
  }
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const formError = actionData?.field === "form" ? actionData.error : undefined;
  return (
    <NarrowPage title="Sign in">
      {loaderData.reset ? <FormMessage tone="info">Your password is changed. Sign in with the new one.</FormMessage> : null}
      {loaderData.ssoRequired ? <FormMessage tone="info">Your course asks students to sign in through their institution: use "Sign in with your institution".</FormMessage> : null}
      {formError ? <FormMessage tone="error">{formError}</FormMessage> : null}
      {loaderData.sso ? (
        <section aria-labelledby="sso-heading" className="mb-8 rounded border border-rule p-4">
          <h2 id="sso-heading" className="mb-2 font-bold">With your institution account</h2>
          <a
            className="inline-block rounded border-2 border-accent px-4 py-2 font-bold text-accent hover:bg-accent-soft"
            href={`/sign-in/institution?returnTo=${encodeURIComponent(loaderData.returnTo)}`}
          >
            Sign in with your institution
          </a>
          {loaderData.sso.label ? <p className="mt-2 text-sm text-ink-soft">{loaderData.sso.label}</p> : null}
        </section>
      ) : null}
      {loaderData.sso ? <h2 className="mb-2 font-bold">With a Ratebook password</h2> : null}
      <Form method="post" noValidate>
        <input type="hidden" name="returnTo" value={loaderData.returnTo} />
        <Field
          label="E-mail"
          name="email"
          type="email"
          autoComplete="username"
          defaultValue={actionData?.email}
          error={actionData?.field === "email" ? actionData.error : undefined}
          required
        />
        <Field
          label="Password"
          name="password"
          type="password"
          autoComplete="current-password"
          error={actionData?.field === "password" ? actionData.error : undefined}
          required
        />
        <Button busy={busy}>Sign in</Button>
      </Form>
      <p className="mt-6">
        <Link className="text-accent underline" to="/password/forgot">Forgot your password?</Link>
      </p>
      <p className="mt-2 text-sm text-ink-soft">Students and staff join through an invitation from their instructor.</p>
    </NarrowPage>
  );
}
