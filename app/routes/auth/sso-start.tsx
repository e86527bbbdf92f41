// "Sign in with your institution": sends the browser to the institution's provider with a fresh
// state, nonce and PKCE challenge (app/.server/sso/oidc.server.ts). A page only when that fails.
import { data, Link, redirect } from "react-router";
import type { Route } from "./+types/sso-start";
import { beginSsoSignIn, SsoRefused } from "~/.server/sso/oidc.server";
import { take, waitWords } from "~/.server/throttle.server";
import { clientAddress } from "~/.server/client-address.server";
import { FormMessage } from "~/components/form";
import { NarrowPage } from "~/components/page";

export const meta: Route.MetaFunction = () => [{ title: "Sign in with your institution · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const limit = await take("ssoStart", clientAddress(request));
  if (!limit.ok) {
    return data(
      { message: `Too many institution sign-ins from this address. Try again in ${waitWords(limit.retryAfterS)}.` },
      { status: 429, headers: { "Retry-After": String(limit.retryAfterS) } },
    );
  }
  try {
    const { url, setCookie } = await beginSsoSignIn(new URL(request.url).searchParams.get("returnTo"));
    throw redirect(url, { headers: { "Set-Cookie": setCookie } });
  } catch (error) {
    if (error instanceof SsoRefused) return data({ message: error.message }, { status: error.status });
    throw error;
  }
}

export default function SsoStart({ loaderData }: Route.ComponentProps) {
  return (
    <NarrowPage title="Sign in with your institution">
      <FormMessage tone="error">{loaderData.message}</FormMessage>
      <Link className="text-accent underline" to="/sign-in">Back to sign-in</Link>
    </NarrowPage>
  );
}
