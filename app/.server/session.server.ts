// Server-side sessions. The cookie holds only a random token (signed, so tampering is caught
// before the database is asked); the database holds its SHA-256 in user_sessions. Ending a row
// ends that browser's session at once, whoever holds a copy of the cookie.
import crypto from "node:crypto";
import { Op, QueryTypes, type Transaction } from "sequelize";
import { createCookie, redirect } from "react-router";
import { config, productionConfigProblems } from "./config.server";
import { User, sequelize } from "./db/models.server";
import { readSignedCookie } from "./signed-cookie.server";
import { UserSession, type SessionVia } from "./db/user-session.server";

// A production server refuses to run with a missing or short secret (scripts/serve.ts says so
// before it listens; this catches any other way of loading the app).
const problems = productionConfigProblems();
if (problems.length) throw new Error(`Ratebook refuses to start in production:\n- ${problems.join("\n- ")}`);
if (config.usingDevSecret) {
  console.warn(
    "\n!!! SESSION_SECRET is not set: using the development default, so sessions can be forged.\n" +
      "!!! Set SESSION_SECRET to a long random string before anyone else can reach this server.\n",
  );
}

export const SESSION_LIFETIME_MS = 12 * 60 * 60 * 1000;
/** last_seen_at is written at most this often, so reads stay reads. */
const TOUCH_EVERY_MS = 5 * 60 * 1000;

export type SessionEndReason =
  | "signed-out"
  | "ended-from-account"
  | "password-changed"
  | "password-reset"
  | "role-changed"
  | "account-removed"
  | "sso-required";

export const sessionCookie = createCookie("__ratebook_session", {
  httpOnly: true,
  sameSite: "lax",
  path: "/",
  secure: config.secureCookies,
  secrets: config.sessionSecrets,
  maxAge: SESSION_LIFETIME_MS / 1000,
});

function digest(token: string) {
  return crypto.createHash("sha256").update(token).digest("hex");
}

async function tokenFrom(request: Request): Promise<string | null> {
  // node:crypto rather than sessionCookie.parse (Web Crypto): same check, a fraction of the cost
  // on every request (signed-cookie.server.ts).
  const value = readSignedCookie(request.headers.get("Cookie"), sessionCookie.name, config.sessionSecrets);
  return typeof value === "string" && value.length >= 32 ? value : null;
}

// One plain query for the session row and its person: it runs on every signed-in request, where
// the ORM's include cost several times the query itself (scripts/bench/api-me-bench.ts).
const SESSION_WITH_USER = `
  select s.id, s.user_id as "userId", s.token_hash as "tokenHash", s.user_agent as "userAgent",
         s.created_at as "createdAt", s.last_seen_at as "lastSeenAt", s.expires_at as "expiresAt",
         s.ended_at as "endedAt", s.ended_reason as "endedReason", s.via,
         u.email, u.password_hash as "passwordHash", u.role, u.display_name as "displayName",
         u.created_at as "userCreatedAt", u.updated_at as "userUpdatedAt"
    from user_sessions s join users u on u.id = s.user_id
   where s.token_hash = $1 and s.ended_at is null and s.expires_at > $2`;

/** The live session row and its person for this request, or null. */
export async function sessionOf(request: Request, now = new Date()): Promise<{ session: UserSession; user: User } | null> {
  const token = await tokenFrom(request);
  if (!token) return null;
  const [row] = await sequelize.query<Record<string, any>>(SESSION_WITH_USER, { bind: [digest(token), now], type: QueryTypes.SELECT });
  if (!row) return null;
  const { email, passwordHash, role, displayName, userCreatedAt, userUpdatedAt, ...sessionRow } = row;
  const user = User.build({ id: row.userId, email, passwordHash, role, displayName, createdAt: userCreatedAt, updatedAt: userUpdatedAt }, { isNewRecord: false, raw: true });
  const session = UserSession.build(sessionRow as never, { isNewRecord: false, raw: true });
  if (now.getTime() - session.lastSeenAt.getTime() > TOUCH_EVERY_MS) {
    await UserSession.update({ lastSeenAt: now }, { where: { id: session.id } });
  }
  return { session, user };
}

/** Signs the person in on this browser: a new session row, and its token in the cookie. */
export async function startSession(userId: number, redirectTo: string, request?: Request, via: SessionVia = "password") {
  const token = crypto.randomBytes(32).toString("base64url");
  const now = new Date();
  await UserSession.destroy({ where: { userId, expiresAt: { [Op.lt]: now } } });
  await UserSession.create({
    userId,
    tokenHash: digest(token),
    userAgent: (request?.headers.get("user-agent") ?? "").slice(0, 200),
    lastSeenAt: now,
    expiresAt: new Date(now.getTime() + SESSION_LIFETIME_MS),
    via,
  });
  return redirect(redirectTo, { headers: { "Set-Cookie": await sessionCookie.serialize(token) } });
}

/** Sign-out: ends this browser's session row (so a copied cookie stops working) and clears the cookie. */
export async function endSession(request: Request) {
  const token = await tokenFrom(request);
  if (token) await UserSession.update({ endedAt: new Date(), endedReason: "signed-out" }, { where: { tokenHash: digest(token), endedAt: null } });
  return redirect("/sign-in", { headers: { "Set-Cookie": await sessionCookie.serialize("", { maxAge: 0 }) } });
}

/** Ends every live session of a person (except `exceptId`, the caller's own, when given). */
export async function endSessionsOf(
  userId: number,
  reason: SessionEndReason,
  options: { exceptId?: number; transaction?: Transaction } = {},
): Promise<number> {
  const where: Record<string | symbol, unknown> = { userId, endedAt: null };
  if (options.exceptId !== undefined) where.id = { [Op.ne]: options.exceptId };
  const [count] = await UserSession.update({ endedAt: new Date(), endedReason: reason }, { where, transaction: options.transaction });
  return count;
}

/** Ends one session of a person (from their account page); false when it was not theirs or not live. */
export async function endOneSession(userId: number, sessionId: number): Promise<boolean> {
  const [count] = await UserSession.update(
    { endedAt: new Date(), endedReason: "ended-from-account" },
    { where: { id: sessionId, userId, endedAt: null } },
  );
  return count === 1;
}

export function liveSessionsOf(userId: number, now = new Date()) {
  return UserSession.findAll({
    where: { userId, endedAt: null, expiresAt: { [Op.gt]: now } },
    order: [["lastSeenAt", "DESC"]],
  });
}
