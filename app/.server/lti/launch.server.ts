// LTI 1.3 launches (1EdTech LTI Core Specification 1.3 and the 1EdTech Security Framework 1.0):
// the platform's third-party login initiation is answered with an OpenID Connect authentication
// request carrying a fresh state and nonce; the platform posts back a signed ID token, which is
// checked with jose against the platform's published key set (signature, issuer, audience,
// expiry), then its nonce (once only), deployment, message type and version. The context is
// mapped to a course, the platform's roles to a course role, the person to an account.
import crypto from "node:crypto";
import { createRemoteJWKSet, decodeJwt, errors as joseErrors, jwtVerify, type JWTPayload } from "jose";
import { createCookie } from "react-router";
import { QueryTypes } from "sequelize";
import { config } from "../config.server";
import { Course, CourseMembership, sequelize, User, type CourseRole, type Role } from "../db/models.server";
import { LtiAccount, LtiContext, LtiPlatform } from "../db/lti.server";
import { recordAudit } from "../audit.server";
import { normaliseEmail, emailProblem } from "~/lib/email-address";

export const LTI_CLAIM = {
  messageType: "https://purl.imsglobal.org/spec/lti/claim/message_type",
  version: "https://purl.imsglobal.org/spec/lti/claim/version",
  deploymentId: "https://purl.imsglobal.org/spec/lti/claim/deployment_id",
  resourceLink: "https://purl.imsglobal.org/spec/lti/claim/resource_link",
  roles: "https://purl.imsglobal.org/spec/lti/claim/roles",
  context: "https://purl.imsglobal.org/spec/lti/claim/context",
  /** AGS 2.0, 3.1: where the platform course's line items are and what the tool may do there */
  agsEndpoint: "https://purl.imsglobal.org/spec/lti-ags/claim/endpoint",
} as const;

/** How long a person may take between the login initiation and the launch. */
export const LOGIN_LIFETIME_S = 10 * 60;
/** Allowed difference between the platform's clock and ours. */
const CLOCK_TOLERANCE_S = 30;

export const loginPath = "/lti/login";
export const launchPath = "/lti/launch";
export const toolLoginUrl = () => `${config.appUrl}${loginPath}`;
export const toolLaunchUrl = () => `${config.appUrl}${launchPath}`;
export const toolKeySetUrl = () => `${config.appUrl}/lti/jwks`;

export type LaunchProblemKind =
  | "unknown-platform"
  | "bad-initiation"
  | "no-login"
  | "replayed"
  | "bad-signature"
  | "expired"
  | "wrong-issuer"
  | "wrong-audience"
  | "wrong-nonce"
  | "unknown-deployment"
  | "bad-message"
  | "no-role"
  | "course-not-linked"
  | "course-archived"
  | "key-set-unavailable";

export class LaunchRefused extends Error {
  constructor(readonly kind: LaunchProblemKind, message: string, readonly status = 400) {
    super(message);
  }
}

// The state also rides in a cookie of this browser, so a launch posted into another browser is refused.
// SameSite=None (with Secure) lets the platform's cross-site form post carry it; on the plain-http
// demo the platform is on the same site (loopback), where Lax is carried too.
export const ltiStateCookie = createCookie("__ratebook_lti_state", {
  httpOnly: true,
  sameSite: config.secureCookies ? "none" : "lax",
  secure: config.secureCookies,
  path: "/lti",
  secrets: config.sessionSecrets,
  maxAge: LOGIN_LIFETIME_S,
});

const sha256 = (s: string) => crypto.createHash("sha256").update(s).digest("hex");

/**
 * The login initiation (LTI Core 1.3, 5.1.1): `iss`, `login_hint`, `target_link_uri` and, when the
 * platform has several registrations, `client_id`. Answers the address of the platform's
 * authentication request and the state cookie.
 */
export async function initiateLogin(params: URLSearchParams | FormData): Promise<{ redirectTo: string; setCookie: string }> {
  const get = (name: string) => {
    const v = params.get(name);
    return typeof v === "string" && v.trim() ? v.trim() : null;
  };
  const iss = get("iss");
  const loginHint = get("login_hint");
  const target = get("target_link_uri");
  if (!iss || !loginHint || !target) {
    const missing = [!iss && "iss", !loginHint && "login_hint", !target && "target_link_uri"].filter(Boolean).join(", ");
    throw new LaunchRefused("bad-initiation", `The learning platform's login request lacks ${missing}, so Ratebook cannot start the launch. Ask the platform's administrator to check the tool's registration.`);
  }
  const clientId = get("client_id");
  const platforms = await LtiPlatform.findAll({ where: clientId ? { issuer: iss, clientId } : { issuer: iss } });
  if (platforms.length !== 1) {
    throw new LaunchRefused(
      "unknown-platform",
      platforms.length === 0
        ? `No learning platform with issuer ${iss}${clientId ? ` and client id ${clientId}` : ""} is registered on this Ratebook. An administrator registers it under Administration > Learning platforms.`
        : `Several registrations of ${iss} exist and the login request names no client_id, so Ratebook cannot tell which one this is.`,
      403,
    );
  }
  const platform = platforms[0];
  const deployment = get("lti_deployment_id");
  if (deployment && !platform.deploymentIds.includes(deployment)) {
    throw new LaunchRefused("unknown-deployment", unknownDeploymentMessage(platform, deployment), 403);
  }
  // Only our own launch address is accepted as the target: never send the browser elsewhere.
  let targetUrl: URL;
  try {
    targetUrl = new URL(target);
  } catch {
    throw new LaunchRefused("bad-initiation", `The launch target (${target}) is not an address.`);
  }
  if (targetUrl.origin !== new URL(config.appUrl).origin) {
    throw new LaunchRefused("bad-initiation", `The launch target ${target} is not on this Ratebook (${config.appUrl}).`);
  }

  const state = crypto.randomBytes(32).toString("base64url");
  const nonce = crypto.randomBytes(32).toString("base64url");
  await sequelize.query(`delete from lti_logins where created_at < now() - interval '1 day'`);
  await sequelize.query(`insert into lti_logins (platform_id, state_hash, nonce, created_at) values ($1, $2, $3, now())`, {
    bind: [platform.id, sha256(state), nonce],
  });
  const auth = new URL(platform.loginUrl);
  const query: Record<string, string> = {
    scope: "openid",
    response_type: "id_token",
    response_mode: "form_post",
    prompt: "none",
    client_id: platform.clientId,
    redirect_uri: toolLaunchUrl(),
    login_hint: loginHint,
    state,
    nonce,
  };
  const messageHint = get("lti_message_hint");
  if (messageHint) query.lti_message_hint = messageHint;
  for (const [k, v] of Object.entries(query)) auth.searchParams.set(k, v);
  return { redirectTo: auth.href, setCookie: await ltiStateCookie.serialize(state) };
}

function unknownDeploymentMessage(platform: LtiPlatform, deployment: string) {
  return `The deployment ${deployment} of ${platform.name} is not registered on this Ratebook (registered: ${platform.deploymentIds.join(", ") || "none"}). An administrator adds it under Administration > Learning platforms.`;
}

// One key set fetcher per URL: jose caches the keys and fetches again for an unknown key id.
const keySets = new Map<string, ReturnType<typeof createRemoteJWKSet>>();
function keySetOf(url: string) {
  let set = keySets.get(url);
  if (!set) {
    set = createRemoteJWKSet(new URL(url), { timeoutDuration: 5000, cooldownDuration: 30_000 });
    keySets.set(url, set);
  }
  return set;
}

export interface LaunchResult {
  userId: number;
  courseId: number;
  role: CourseRole;
  createdCourse: boolean;
  createdAccount: boolean;
  createdMembership: boolean;
}

/** Checks a launch (the platform's form post: `id_token`, `state`) and maps it; throws LaunchRefused saying why not. */
export async function acceptLaunch(form: FormData, cookieHeader: string | null): Promise<LaunchResult> {
  const idToken = form.get("id_token");
  const state = form.get("state");
  if (typeof idToken !== "string" || !idToken || typeof state !== "string" || !state) {
    throw new LaunchRefused("bad-message", "The launch carries no id_token or no state: it did not come from a learning platform's launch.");
  }
  const cookieState = await ltiStateCookie.parse(cookieHeader);
  if (cookieState !== state) {
    throw new LaunchRefused("no-login", "This launch does not belong to a login this browser started (its state is not this browser's). Open Ratebook from the learning platform again.");
  }
  // The login is used up here, before anything else: a second post of the same launch finds it used.
  const [row] = await sequelize.query<{ platformId: number; nonce: string; fresh: boolean; usedAt: Date | null }>(
    `with hit as (
       update lti_logins set used_at = now()
        where state_hash = $1 and used_at is null and created_at > now() - make_interval(secs => $2)
       returning platform_id, nonce)
     select hit.platform_id as "platformId", hit.nonce, true as fresh, null::timestamptz as "usedAt" from hit
     union all
     select l.platform_id, l.nonce, false, l.used_at from lti_logins l where l.state_hash = $1 and not exists (select 1 from hit)`,
    { bind: [sha256(state), LOGIN_LIFETIME_S], type: QueryTypes.SELECT },
  );
  if (!row) throw new LaunchRefused("no-login", "Ratebook has no record of the login this launch answers. Open Ratebook from the learning platform again.");
  if (!row.fresh) {
    throw new LaunchRefused(
      row.usedAt ? "replayed" : "expired",
      row.usedAt
        ? "This launch was already used once; a launch is accepted only once. Open Ratebook from the learning platform again."
        : `The launch came more than ${LOGIN_LIFETIME_S / 60} minutes after its login started. Open Ratebook from the learning platform again.`,
    );
  }
  const platform = await LtiPlatform.findByPk(row.platformId);
  if (!platform) throw new LaunchRefused("unknown-platform", "The learning platform of this launch is no longer registered.", 403);

  let claims: JWTPayload;
  try {
    ({ payload: claims } = await jwtVerify(idToken, keySetOf(platform.keySetUrl), {
      issuer: platform.issuer,
      audience: platform.clientId,
      algorithms: ["RS256", "RS384", "RS512", "ES256", "ES384", "PS256"],
      clockTolerance: CLOCK_TOLERANCE_S,
      requiredClaims: ["exp", "iat", "sub", "nonce"],
    }));
  } catch (error) {
    throw tokenRefusal(error, platform, idToken);
  }
  // Several audiences: the authorised party must be us (OpenID Connect Core 1.0, 3.1.3.7).
  if (Array.isArray(claims.aud) && claims.aud.length > 1 && claims.azp !== platform.clientId) {
    throw new LaunchRefused("wrong-audience", `The launch names several audiences and its authorised party (${String(claims.azp)}) is not Ratebook's client id ${platform.clientId}.`);
  }
  if (claims.nonce !== row.nonce) {
    throw new LaunchRefused("wrong-nonce", "The launch's nonce is not the one Ratebook sent for this login: it was made for another login. Open Ratebook from the learning platform again.");
  }
  const deployment = claims[LTI_CLAIM.deploymentId];
  if (typeof deployment !== "string" || !platform.deploymentIds.includes(deployment)) {
    throw new LaunchRefused("unknown-deployment", unknownDeploymentMessage(platform, String(deployment ?? "(none)")), 403);
  }
  if (claims[LTI_CLAIM.messageType] !== "LtiResourceLinkRequest") {
    throw new LaunchRefused("bad-message", `This launch is a ${String(claims[LTI_CLAIM.messageType] ?? "message of no type")}; Ratebook accepts resource link launches (LtiResourceLinkRequest) only.`);
  }
  if (claims[LTI_CLAIM.version] !== "1.3.0") {
    throw new LaunchRefused("bad-message", `This launch is LTI version ${String(claims[LTI_CLAIM.version] ?? "(none)")}; Ratebook accepts 1.3.0.`);
  }
  const resourceLink = claims[LTI_CLAIM.resourceLink] as { id?: unknown } | undefined;
  const context = claims[LTI_CLAIM.context] as { id?: unknown; label?: unknown; title?: unknown } | undefined;
  if (!resourceLink || typeof resourceLink.id !== "string") throw new LaunchRefused("bad-message", "The launch has no resource link id.");
  if (!context || typeof context.id !== "string" || !context.id) {
    throw new LaunchRefused("bad-message", "The launch names no course (context) on the platform, so Ratebook cannot tell which course to open.");
  }
  const roles = Array.isArray(claims[LTI_CLAIM.roles]) ? (claims[LTI_CLAIM.roles] as unknown[]).filter((r): r is string => typeof r === "string") : [];
  const role = courseRoleOf(roles);
  if (!role) {
    throw new LaunchRefused("no-role", `None of your roles on the platform (${roles.join(", ") || "none"}) is one Ratebook has a course role for (instructor, teaching assistant, learner).`, 403);
  }
  return mapLaunch(platform, claims, { id: context.id, label: str(context.label), title: str(context.title) }, role);
}

const str = (v: unknown) => (typeof v === "string" && v.trim() ? v.trim() : null);

function tokenRefusal(error: unknown, platform: LtiPlatform, idToken: string): LaunchRefused {
  if (error instanceof joseErrors.JWTExpired) {
    return new LaunchRefused("expired", "The launch has expired (its exp time has passed). Open Ratebook from the learning platform again.");
  }
  if (error instanceof joseErrors.JWTClaimValidationFailed) {
    let given: JWTPayload = {};
    try {
      given = decodeJwt(idToken);
    } catch {
      /* already refused */
    }
    if (error.claim === "iss") return new LaunchRefused("wrong-issuer", `The launch says it comes from ${String(given.iss)}, but this login was started by ${platform.issuer}.`);
    if (error.claim === "aud") return new LaunchRefused("wrong-audience", `The launch is addressed to ${JSON.stringify(given.aud)}, not to Ratebook's client id ${platform.clientId} at ${platform.name}.`);
    if (error.claim === "iat" || error.claim === "nbf") return new LaunchRefused("expired", `The launch's time (${error.claim}) is not valid now: check the platform's clock.`);
    return new LaunchRefused("bad-message", `The launch lacks or has a wrong ${error.claim} claim.`);
  }
  if (error instanceof joseErrors.JWSSignatureVerificationFailed || error instanceof joseErrors.JWKSNoMatchingKey || error instanceof joseErrors.JOSEAlgNotAllowed) {
    return new LaunchRefused("bad-signature", `The launch is not signed by a key ${platform.name} publishes at ${platform.keySetUrl}, so it was refused.`);
  }
  if (error instanceof joseErrors.JWKSTimeout || error instanceof joseErrors.JWKSInvalid || error instanceof TypeError) {
    return new LaunchRefused("key-set-unavailable", `Ratebook could not read ${platform.name}'s key set at ${platform.keySetUrl} (${(error as Error).message}). Try again later.`, 503);
  }
  if (error instanceof joseErrors.JOSEError) {
    return new LaunchRefused("bad-signature", `The launch is not a valid signed token (${(error as Error).message}).`);
  }
  throw error;
}

// LIS vocabulary for context roles (LTI Core 1.3, A.2.3); short names are the deprecated simple form.
const LIS = "http://purl.imsglobal.org/vocab/lis/v2/membership";
export function courseRoleOf(roles: string[]): CourseRole | null {
  const has = (...names: string[]) => roles.some((r) => names.includes(r));
  if (has(`${LIS}/Instructor#TeachingAssistant`, "TeachingAssistant")) return "demonstrator";
  if (has(`${LIS}#Instructor`, "Instructor")) return "instructor";
  if (has(`${LIS}#Learner`, "Learner")) return "student";
  return null;
}

/** The launch's AGS endpoint claim: the line item container (only https, or http on loopback) and the granted scopes. */
function agsOf(claims: JWTPayload): { lineitemsUrl: string | null; agsScopes: string[] } {
  const claim = claims[LTI_CLAIM.agsEndpoint] as { lineitems?: unknown; scope?: unknown } | undefined;
  const url = typeof claim?.lineitems === "string" ? claim.lineitems : null;
  const scopes = Array.isArray(claim?.scope) ? claim.scope.filter((x): x is string => typeof x === "string") : [];
  if (!url) return { lineitemsUrl: null, agsScopes: [] };
  try {
    const u = new URL(url);
    const loopback = u.hostname === "127.0.0.1" || u.hostname === "localhost" || u.hostname === "[::1]";
    if (u.protocol !== "https:" && !(u.protocol === "http:" && loopback)) return { lineitemsUrl: null, agsScopes: [] };
  } catch {
    return { lineitemsUrl: null, agsScopes: [] };
  }
  return { lineitemsUrl: url.slice(0, 500), agsScopes: scopes };
}

async function mapLaunch(
  platform: LtiPlatform,
  claims: JWTPayload,
  context: { id: string; label: string | null; title: string | null },
  role: CourseRole,
): Promise<LaunchResult> {
  return sequelize.transaction(async (transaction) => {
    let createdCourse = false;
    let createdAccount = false;
    let createdMembership = false;
    const link = await LtiContext.findOne({ where: { platformId: platform.id, contextId: context.id }, transaction });
    let course = link ? await Course.findByPk(link.courseId, { transaction }) : null;
    if (!course) {
      // Only an instructor's launch brings a new platform course into Ratebook.
      if (role !== "instructor") {
        throw new LaunchRefused("course-not-linked", `The course ${context.label ?? context.title ?? context.id} on ${platform.name} is not linked to a Ratebook course yet. Your instructor links it by opening Ratebook from the platform once.`, 403);
      }
      const code = (context.label ?? `LTI-${context.id}`).slice(0, 40);
      course = await Course.create({ code, title: (context.title ?? code).slice(0, 200), term: "" }, { transaction });
      await LtiContext.create({ platformId: platform.id, contextId: context.id, courseId: course.id, title: context.title, ...agsOf(claims) }, { transaction });
      createdCourse = true;
    } else if (link) {
      // The latest launch says where the platform course takes scores now.
      const ags = agsOf(claims);
      if (ags.lineitemsUrl && (ags.lineitemsUrl !== link.lineitemsUrl || JSON.stringify(ags.agsScopes) !== JSON.stringify(link.agsScopes))) await link.update(ags, { transaction });
    }
    if (course.archivedAt) throw new LaunchRefused("course-archived", `The Ratebook course ${course.code} linked to this platform course is archived.`, 403);

    const subject = String(claims.sub);
    const known = await LtiAccount.findOne({ where: { platformId: platform.id, subject }, transaction });
    let user = known ? await User.findByPk(known.userId, { transaction }) : null;
    if (!user) {
      const email = str(claims.email) ? normaliseEmail(claims.email) : null;
      const usable = email && !emailProblem(email) ? email : null;
      if (usable) user = await User.findOne({ where: { email: usable }, transaction });
      if (!user) {
        // The platform vouches for the person: an account without a password (they come in through the platform).
        const accountRole: Role = role === "instructor" ? "course-creator" : "member";
        const name = str(claims.name) ?? ([str(claims.given_name), str(claims.family_name)].filter(Boolean).join(" ") || `Platform user ${subject}`);
        user = await User.create(
          { email: usable ?? `lti-${platform.id}-${crypto.createHash("sha256").update(subject).digest("hex").slice(0, 16)}@lti.ratebook.invalid`, displayName: name.slice(0, 120), role: accountRole, passwordHash: null },
          { transaction },
        );
        createdAccount = true;
      }
      await LtiAccount.create({ platformId: platform.id, subject, userId: user.id }, { transaction });
      await recordAudit({ actorId: user.id, action: createdAccount ? "user.lti-created" : "user.lti-linked", entityType: "user", entityId: user.id, after: { platform: platform.issuer, subject } }, transaction);
    }
    if (createdCourse) {
      await recordAudit({ actorId: user.id, action: "course.created", entityType: "course", entityId: course.id, after: { code: course.code, title: course.title, ltiPlatform: platform.issuer, ltiContext: context.id } }, transaction);
    }
    let membership = await CourseMembership.findOne({ where: { courseId: course.id, userId: user.id }, transaction });
    if (!membership) {
      membership = await CourseMembership.create({ courseId: course.id, userId: user.id, role }, { transaction });
      createdMembership = true;
      await recordAudit({ actorId: user.id, action: "membership.added", entityType: "course_membership", entityId: membership.id, after: { courseId: course.id, userId: user.id, role, via: "lti" } }, transaction);
    }
    // An existing membership keeps its role: roles inside Ratebook are the instructor's to change.
    return { userId: user.id, courseId: course.id, role: membership.role, createdCourse, createdAccount, createdMembership };
  });
}
