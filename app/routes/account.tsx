import { data, Form, useNavigation } from "react-router";
import type { Route } from "./+types/account";
import { currentPrincipal, requireUser } from "~/.server/guards.server";
import { changeOwnPassword, type FieldErrors } from "~/.server/people.server";
import { MIN_PASSWORD_LENGTH } from "~/.server/passwords.server";
import { readForm } from "~/.server/body.server";
import { formId } from "~/.server/ids.server";
import { endOneSession, endSessionsOf, liveSessionsOf } from "~/.server/session.server";
import { browserName } from "~/lib/user-agent";
import { Button, Field, FormMessage } from "~/components/form";
import { apiTokensOf, checkTokenRequest, createApiToken, revokeApiToken, TokenCapError } from "~/.server/api-tokens.server";
import { ApiTokensSection } from "~/components/api-tokens-section";
import { PageTitle } from "~/components/page";
import { trailFor } from "~/lib/place";
import { accountTypeText } from "~/lib/format";

export const meta: Route.MetaFunction = () => [{ title: "Your account · Ratebook" }];

const when = (d: Date) => d.toISOString().replace("T", " ").slice(0, 16) + " UTC";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const mine = (await currentPrincipal(request))?.sessionId;
  const sessions = (await liveSessionsOf(user.id)).map((s) => ({
    id: s.id,
    browser: browserName(s.userAgent),
    since: when(s.createdAt),
    lastSeen: when(s.lastSeenAt),
    current: s.id === mine,
  }));
  const tokens = (await apiTokensOf(user.id)).map((t) => ({
    ...t,
    created: when(t.createdAt),
    expires: t.expiresAt ? when(t.expiresAt) : null,
    lastUsed: t.lastUsedAt ? when(t.lastUsedAt) : null,
  }));
  return { name: user.displayName, email: user.email, role: user.role, minLength: MIN_PASSWORD_LENGTH, sessions, tokens };
}

type ActionResult = {
  intent: string;
  changed?: boolean;
  errors: FieldErrors;
  notice?: string;
  newToken?: { name: string; token: string; expires: string | null };
};

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const mine = (await currentPrincipal(request))?.sessionId;
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "change-password");
  const reply = (r: Omit<ActionResult, "intent">, status = 200) => data<ActionResult>({ intent, ...r }, { status });
  if (intent === "end-session") {
    const id = formId(form, "sessionId");
    if (id === null) return reply({ errors: { form: "That is not one of your sessions; reload the page and try again." } }, 400);
    const ended = await endOneSession(user.id, id);
    if (!ended) return reply({ errors: { form: "That session has already ended." } }, 404);
    return reply({ errors: {}, notice: id === mine ? "This session is ended; you will be asked to sign in again." : "The session is ended." });
  }
  if (intent === "end-other-sessions") {
    const count = await endSessionsOf(user.id, "ended-from-account", { exceptId: mine });
    return reply({ errors: {}, notice: count === 1 ? "1 other session is ended." : `${count} other sessions are ended.` });
  }
  if (intent === "create-token") {
    const checked = checkTokenRequest({ name: form.get("tokenName") ?? "", expiresInDays: form.get("expiresInDays") ?? "" });
    if (!checked.ok) return reply({ errors: Object.fromEntries(checked.errors.map((e) => [e.path, e.message])) }, 400);
    let made;
    try {
      made = await createApiToken(user, checked.name, checked.expiresInDays);
    } catch (error) {
      if (error instanceof TokenCapError) return reply({ errors: { tokenName: error.message } }, 409);
      throw error;
    }
    return reply({ errors: {}, newToken: { name: made.name, token: made.token, expires: made.expiresAt ? when(made.expiresAt) : null } });
  }
  if (intent === "revoke-token") {
    const id = formId(form, "tokenId");
    if (id === null || !(await revokeApiToken(user.id, id))) return reply({ errors: { form: "That is not one of your tokens; reload the page and try again." } }, 404);
    return reply({ errors: {}, notice: "The token is revoked; it is refused from now on." });
  }
  if (intent !== "change-password") return reply({ errors: { form: `Unknown action "${intent}".` } }, 400);
  const result = await changeOwnPassword(user, { current: form.get("current"), password: form.get("password"), confirm: form.get("confirm") }, mine);
  return reply({ changed: result.ok, errors: result.ok ? {} : result.errors }, result.ok ? 200 : 400);
}

export default function Account({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errors = actionData?.intent === "change-password" ? actionData.errors : {};
  const tokenIntent = actionData?.intent === "create-token" || actionData?.intent === "revoke-token";
  const sessionProblem = actionData && actionData.intent !== "change-password" && !tokenIntent ? actionData.errors.form : undefined;
  const others = loaderData.sessions.filter((s) => !s.current).length;
  return (
    <div className="max-w-2xl">
      <PageTitle trail={trailFor("Account")} sub={`${loaderData.email} · account type: ${accountTypeText(loaderData.role)}`}>{loaderData.name}</PageTitle>
      <section aria-labelledby="password-h" className="max-w-lg">
        <h2 id="password-h" className="mb-3 text-xl font-bold">Change your password</h2>
        {actionData?.changed ? <FormMessage tone="info">Your password is changed, and every other session is signed out. Use the new password next time you sign in.</FormMessage> : null}
        <Form method="post" noValidate key={actionData?.changed ? "done" : "form"}>
          <input type="hidden" name="intent" value="change-password" />
          <Field label="Current password" name="current" type="password" autoComplete="current-password" error={errors.current} />
          <Field label="New password" name="password" type="password" autoComplete="new-password" hint={`At least ${loaderData.minLength} characters.`} error={errors.password} />
          <Field label="New password again" name="confirm" type="password" autoComplete="new-password" />
          <Button busy={busy}>Change password</Button>
        </Form>
      </section>

      <section aria-labelledby="sessions-h" className="mt-10">
        <h2 id="sessions-h" className="mb-1 text-xl font-bold">Where you are signed in</h2>
        <p className="mb-3 text-ink-soft">Each browser you signed in with. Ending a session signs that browser out at once; sessions end by themselves 12 hours after sign-in.</p>
        {actionData?.notice && !tokenIntent ? <FormMessage tone="info">{actionData.notice}</FormMessage> : null}
        {sessionProblem ? <FormMessage tone="error">{sessionProblem}</FormMessage> : null}
        <ul className="divide-y divide-rule rounded border border-rule bg-white">
          {loaderData.sessions.map((s) => (
            <li key={s.id} className="flex flex-wrap items-center justify-between gap-2 px-4 py-3">
              <div>
                <p className="font-bold">{s.browser}{s.current ? " · this browser" : ""}</p>
                <p className="text-sm text-ink-soft">Signed in {s.since}; last seen {s.lastSeen}</p>
              </div>
              <Form method="post">
                <input type="hidden" name="intent" value="end-session" />
                <input type="hidden" name="sessionId" value={s.id} />
                <button type="submit" className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft">
                  {s.current ? "Sign out here" : "End this session"}
                </button>
              </Form>
            </li>
          ))}
        </ul>
        {others > 0 ? (
          <Form method="post" className="mt-3">
            <input type="hidden" name="intent" value="end-other-sessions" />
            <button type="submit" className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft">End all other sessions ({others})</button>
          </Form>
        ) : null}
      </section>

      <ApiTokensSection
        tokens={loaderData.tokens}
        newToken={tokenIntent ? actionData?.newToken : undefined}
        errors={tokenIntent ? actionData!.errors : {}}
        notice={tokenIntent ? actionData?.notice : undefined}
        busy={busy}
      />
    </div>
  );
}
