// Where the institution's provider sends the browser back: the answer is checked (state, PKCE,
// the ID token's signature, issuer, audience, expiry and nonce), the person is matched to an
// invited or rostered account, and a session starts. Anything else gets a page saying why.
import { data, Link } from "react-router";
import type { Route } from "./+types/sso-return";
import { endFlowCookie, finishSsoSignIn, SsoRefused } from "~/.server/sso/oidc.server";
import { accountForInstitutionPerson } from "~/.server/sso/accounts.server";
import { startSession } from "~/.server/session.server";
import { rememberAccount } from "~/.server/throttle.server";
import { FormMessage } from "~/components/form";
import { NarrowPage } from "~/components/page";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data && "title" in data ? data.title : "Institution sign-in"} · Ratebook` }];

export async function loader({ request }: Route.LoaderArgs) {
  const clear = await endFlowCookie();
  try {
    const { person, returnTo } = await finishSsoSignIn(request);
    const match = await accountForInstitutionPerson(person);
    if (!match.ok) {
      const who = match.email ?? "this institution account";
      const message =
        match.reason === "unverified-email"
          ? `Your institution has not verified the e-mail address ${who}, so Ratebook cannot tell which account is yours. Ask your institution to verify it, or ask your instructor to add you to the course.`
          : match.reason === "ambiguous-id"
            ? "Your institution id is on more than one Ratebook account, so Ratebook cannot tell which is yours. Ask your instructor to correct the roster."
            : `Ratebook has no account for ${who}. Accounts are made only by an invitation or a course roster: ask your instructor to add you to the course with this e-mail address (or your institution id), then sign in again.`;
      return data({ title: "No Ratebook account", message, kind: match.reason }, { status: 403, headers: { "Set-Cookie": clear } });
    }
    const res = await startSession(match.user.id, returnTo, request, "sso");
    res.headers.append("Set-Cookie", clear);
    res.headers.append("Set-Cookie", await rememberAccount(request, match.user.id));
    throw res;
  } catch (error) {
    if (error instanceof SsoRefused) {
      return data({ title: "Sign-in refused", message: error.message, kind: error.kind }, { status: error.status, headers: { "Set-Cookie": clear } });
    }
    throw error;
  }
}

export default function SsoReturn({ loaderData }: Route.ComponentProps) {
  return (
    <NarrowPage title={loaderData.title}>
      <FormMessage tone="error">{loaderData.message}</FormMessage>
      <p>
        <Link className="text-accent underline" to="/sign-in">Back to sign-in</Link>
      </p>
    </NarrowPage>
  );
}
