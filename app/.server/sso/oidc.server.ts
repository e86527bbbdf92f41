// Single sign-on with the institution's OpenID Connect provider: the authorisation code flow with
// PKCE through openid-client 6 (discovery, the token request, the ID token's signature, issuer,
// audience, expiry and nonce checks are all the library's). Between the redirect out and the
// answer back, this browser keeps the flow's state, nonce and PKCE verifier in a signed,
// short-lived cookie: an answer is accepted only in the browser that started that sign-in.
import * as oidc from "openid-client";
import { createCookie } from "react-router";
import { config, isLoopback, type SsoConfig } from "../config.server";
import { safeReturnTo } from "~/lib/return-to";

/** How long a person may take at the institution's sign-in page. */
export const FLOW_LIFETIME_S = 10 * 60;
export const SSO_RETURN_PATH = "/sign-in/institution/return";

export interface SsoFlow {
  state: string;
  nonce: string;
  verifier: string;
  returnTo: string;
  startedAt: number;
}

export const ssoFlowCookie = createCookie("__ratebook_sso_flow", {
  httpOnly: true,
  // Lax: the provider's redirect back is a top-level GET, which carries it.
  sameSite: "lax",
  path: "/sign-in/institution",
  secure: config.secureCookies,
  secrets: config.sessionSecrets,
  maxAge: FLOW_LIFETIME_S,
});

export function ssoConfig(): SsoConfig | null {
  return config.sso;
}

export function redirectUri() {
  return `${config.appUrl}${SSO_RETURN_PATH}`;
}

// Discovery once per process; a failure is not kept, so the next sign-in tries again.
let discovered: Promise<oidc.Configuration> | null = null;
function providerConfiguration(sso: SsoConfig): Promise<oidc.Configuration> {
  if (!discovered) {
    const issuer = new URL(sso.issuer);
    // Plain http only for a provider on this machine (the local fake); config refuses it elsewhere in production.
    const execute = issuer.protocol === "http:" && isLoopback(issuer.hostname) ? [oidc.allowInsecureRequests] : [];
    discovered = oidc.discovery(issuer, sso.clientId, sso.clientSecret, undefined, { execute, timeout: 10 }).catch((error) => {
      discovered = null;
      throw error;
    });
  }
  return discovered;
}

/** A sign-in failure shown on its own page; `status` is the page's HTTP status. */
export class SsoRefused extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly kind: "not-configured" | "no-flow" | "provider-error" | "state" | "nonce" | "code" | "token" | "unavailable",
  ) {
    super(message);
  }
}

const START_AGAIN = "Start again from the sign-in page.";

/** The address at the institution to send this browser to, and the cookie that remembers the flow. */
export async function beginSsoSignIn(returnTo: unknown): Promise<{ url: string; setCookie: string }> {
  const sso = ssoConfig();
  if (!sso) throw new SsoRefused("Signing in with an institution is not set up on this Ratebook.", 404, "not-configured");
  let configuration: oidc.Configuration;
  try {
    configuration = await providerConfiguration(sso);
  } catch (error) {
    throw new SsoRefused(`Your institution's sign-in service (${sso.issuer}) did not answer: ${(error as Error).message}. Try again later, or sign in with your password.`, 503, "unavailable");
  }
  const flow: SsoFlow = {
    state: oidc.randomState(),
    nonce: oidc.randomNonce(),
    verifier: oidc.randomPKCECodeVerifier(),
    returnTo: safeReturnTo(returnTo),
    startedAt: Date.now(),
  };
  const url = oidc.buildAuthorizationUrl(configuration, {
    redirect_uri: redirectUri(),
    scope: "openid email profile",
    state: flow.state,
    nonce: flow.nonce,
    code_challenge: await oidc.calculatePKCECodeChallenge(flow.verifier),
    code_challenge_method: "S256",
  });
  return { url: url.href, setCookie: await ssoFlowCookie.serialize(flow) };
}

export interface InstitutionPerson {
  issuer: string;
  subject: string;
  email: string | null;
  emailVerified: boolean;
  name: string | null;
  /** the value of OIDC_ID_CLAIM, when configured and given */
  institutionId: string | null;
}

async function flowOf(request: Request): Promise<SsoFlow | null> {
  const value = await ssoFlowCookie.parse(request.headers.get("Cookie"));
  if (!value || typeof value !== "object") return null;
  const flow = value as SsoFlow;
  if (typeof flow.state !== "string" || typeof flow.nonce !== "string" || typeof flow.verifier !== "string") return null;
  if (Date.now() - Number(flow.startedAt) > FLOW_LIFETIME_S * 1000) return null;
  return flow;
}

/** The cookie header that ends the flow (every answer back uses it up, good or bad). */
export function endFlowCookie() {
  return ssoFlowCookie.serialize("", { maxAge: 0 });
}

/**
 * Checks the provider's answer on the return address and asks for the tokens. Returns who the
 * institution says this is, or throws SsoRefused saying what was wrong.
 */
export async function finishSsoSignIn(request: Request): Promise<{ person: InstitutionPerson; returnTo: string }> {
  const sso = ssoConfig();
  if (!sso) throw new SsoRefused("Signing in with an institution is not set up on this Ratebook.", 404, "not-configured");
  const url = new URL(request.url);
  const flow = await flowOf(request);
  if (!flow) {
    throw new SsoRefused(`This browser has no institution sign-in in progress: it was started in another browser, took longer than ${FLOW_LIFETIME_S / 60} minutes, or this answer was already used. ${START_AGAIN}`, 400, "no-flow");
  }
  const error = url.searchParams.get("error");
  if (error) {
    const description = url.searchParams.get("error_description");
    const words = error === "access_denied" ? "you cancelled, or the institution refused access" : error;
    throw new SsoRefused(`Your institution did not sign you in (${words}${description ? `: ${description}` : ""}). ${START_AGAIN}`, 400, "provider-error");
  }
  // Checked here too (the library checks it again) so the page can say exactly this.
  if (url.searchParams.get("state") !== flow.state) {
    throw new SsoRefused(`The answer from your institution does not belong to the sign-in this browser started (its state does not match), so it was refused. ${START_AGAIN}`, 400, "state");
  }
  let configuration: oidc.Configuration;
  try {
    configuration = await providerConfiguration(sso);
  } catch (e) {
    throw new SsoRefused(`Your institution's sign-in service (${sso.issuer}) did not answer: ${(e as Error).message}. Try again later.`, 503, "unavailable");
  }
  // The provider answers to the registered address; the request may have come in through a proxy.
  const answer = new URL(redirectUri());
  answer.search = url.search;
  let tokens: Awaited<ReturnType<typeof oidc.authorizationCodeGrant>>;
  try {
    tokens = await oidc.authorizationCodeGrant(configuration, answer, {
      pkceCodeVerifier: flow.verifier,
      expectedState: flow.state,
      expectedNonce: flow.nonce,
      idTokenExpected: true,
    });
  } catch (e) {
    throw refusalOf(e);
  }
  const claims = tokens.claims()!;
  let info: Record<string, unknown> = { ...claims };
  // Many providers put e-mail and profile claims only in the userinfo answer when an access token is issued.
  if (claims.email === undefined || (sso.idClaim && claims[sso.idClaim] === undefined)) {
    try {
      info = { ...(await oidc.fetchUserInfo(configuration, tokens.access_token, claims.sub)), ...claims };
    } catch (e) {
      throw refusalOf(e);
    }
  }
  const str = (v: unknown) => (typeof v === "string" && v.trim() ? v.trim() : null);
  return {
    person: {
      issuer: String(claims.iss),
      subject: claims.sub,
      email: str(info.email),
      // Only a literal true counts (some providers send the string "true"; that is not a verification).
      emailVerified: info.email_verified === true,
      name: str(info.name),
      institutionId: sso.idClaim ? str(info[sso.idClaim]) ?? (typeof info[sso.idClaim] === "number" ? String(info[sso.idClaim]) : null) : null,
    },
    returnTo: flow.returnTo,
  };
}

function refusalOf(e: unknown): SsoRefused {
  if (e instanceof oidc.ResponseBodyError) {
    if (e.error === "invalid_grant") {
      return new SsoRefused(`Your institution refused to exchange the sign-in code: it was already used, has expired, or does not match this browser's proof key (PKCE). ${START_AGAIN}`, 400, "code");
    }
    return new SsoRefused(`Your institution refused the sign-in (${e.error}${e.error_description ? `: ${e.error_description}` : ""}). ${START_AGAIN}`, 400, "token");
  }
  if (e instanceof oidc.AuthorizationResponseError) {
    return new SsoRefused(`Your institution did not sign you in (${e.error}${e.error_description ? `: ${e.error_description}` : ""}). ${START_AGAIN}`, 400, "provider-error");
  }
  const cause = (e as { cause?: unknown }).cause;
  // openid-client names the failed check in its cause (e.g. 'unexpected ID Token "nonce" claim value').
  const message = [(e as Error).message ?? String(e), cause instanceof Error ? cause.message : ""].filter(Boolean).join(": ");
  if (/"nonce"/i.test(message)) {
    return new SsoRefused(`The identity token from your institution was made for a different sign-in (its nonce does not match this browser's), so it was refused. ${START_AGAIN}`, 400, "nonce");
  }
  if (/"state"/i.test(message)) {
    return new SsoRefused(`The answer from your institution does not belong to the sign-in this browser started (its state does not match). ${START_AGAIN}`, 400, "state");
  }
  if (e instanceof TypeError || (e as { code?: string }).code === "OAUTH_TIMEOUT" || (e as Error).name === "AbortError" || (e as Error).name === "TimeoutError") {
    return new SsoRefused(`Your institution's sign-in service did not answer (${message}). Try again later.`, 503, "unavailable");
  }
  return new SsoRefused(`The answer from your institution could not be checked (${message}), so it was refused. ${START_AGAIN}`, 400, "token");
}
