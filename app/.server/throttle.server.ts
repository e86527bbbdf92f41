// Request limits: sign-in guessing, password reset requests, and the expensive API calls
// (upload preview, /api/fit, token creation). Counted with rate-limiter-flexible in PostgreSQL
// (table rate_limits, migration 0035), so every app server shares them. A point is taken
// *before* the work (so a burst of parallel guesses cannot all pass a check made beforehand)
// and given back when a sign-in succeeds.
//
// Sign-in: no lock that anyone can trigger. Failures are counted per account *and* client
// address (5 per 15 minutes: only that client is slowed down for that account), per client
// address (30 per 15 minutes, whatever the accounts), and per account only from browsers that
// have never signed in to it (20 per hour): a browser that signed in to the account before
// (the `__ratebook_known` cookie) is not held back by others' failures.
import crypto from "node:crypto";
import { createCookie } from "react-router";
import { RateLimiterPostgres, RateLimiterRes } from "rate-limiter-flexible";
import type { Sequelize } from "sequelize";
import { getSequelize } from "./db/sequelize.server";
import { config } from "./config.server";
import { clientAddress } from "./client-address.server";
import { normaliseEmail } from "~/lib/email-address";

export const LIMITS = {
  signInPair: { points: 5, duration: 15 * 60, what: "failed sign-ins for one account from one address" },
  signInClient: { points: 30, duration: 15 * 60, what: "failed sign-ins from one address" },
  signInAccount: { points: 20, duration: 60 * 60, what: "failed sign-ins for one account from browsers new to it" },
  ssoStart: { points: 30, duration: 15 * 60, what: "institution sign-ins started from one address" },
  resetClient: { points: 5, duration: 60 * 60, what: "password reset requests from one address" },
  resetAddress: { points: 3, duration: 60 * 60, what: "password reset requests for one e-mail" },
  preview: { points: 60, duration: 60, what: "upload previews per person" },
  fit: { points: 60, duration: 60, what: "fits per person" },
  tokenCreate: { points: 10, duration: 60 * 60, what: "new API tokens per person" },
} as const;
export type LimitName = keyof typeof LIMITS;

// Kept for callers and tests that name the sign-in limits.
export const THROTTLE = { maxFailuresPerEmail: LIMITS.signInPair.points, maxFailuresPerIp: LIMITS.signInClient.points };

let made: { sequelize: Sequelize; limiters: Record<LimitName, RateLimiterPostgres> } | null = null;

function limiter(name: LimitName): RateLimiterPostgres {
  const sequelize = getSequelize();
  if (made?.sequelize !== sequelize) {
    const limiters = Object.fromEntries(
      Object.entries(LIMITS).map(([key, l]) => [
        key,
        // tableCreated: the migration made the table (the library would otherwise race to create
        // it and refuse consume() until it had); tableName: one table for all, not one per prefix.
        new RateLimiterPostgres({ storeClient: sequelize, storeType: "sequelize", tableName: "rate_limits", tableCreated: true, keyPrefix: key, points: l.points, duration: l.duration }),
      ]),
    ) as Record<LimitName, RateLimiterPostgres>;
    made = { sequelize, limiters };
  }
  return made.limiters[name];
}

// The store's key is at most 255 characters: e-mails and addresses go in hashed, each part on
// its own (so that every pair of one account can be found by its prefix).
const hashOf = (part: string) => crypto.createHash("sha256").update(part).digest("base64url").slice(0, 32);
const keyOf = (parts: string[]) => parts.map(hashOf).join(".");

export type Take = { ok: true } | { ok: false; retryAfterS: number; limit: LimitName };

/** Takes one point from a limit; refused (with seconds to wait) when it is used up. Database errors throw. */
export async function take(name: LimitName, ...key: string[]): Promise<Take> {
  try {
    await limiter(name).consume(keyOf(key));
    return { ok: true };
  } catch (error) {
    if (error instanceof RateLimiterRes) return { ok: false, retryAfterS: Math.max(1, Math.ceil(error.msBeforeNext / 1000)), limit: name };
    throw error;
  }
}

export async function giveBack(name: LimitName, ...key: string[]) {
  await limiter(name).reward(keyOf(key));
}

export async function forget(name: LimitName, ...key: string[]) {
  await limiter(name).delete(keyOf(key));
}

/** In words, for messages: "3 minutes", "40 seconds". */
export function waitWords(seconds: number): string {
  if (seconds < 60) return `${seconds} second${seconds === 1 ? "" : "s"}`;
  const minutes = Math.ceil(seconds / 60);
  return `${minutes} minute${minutes === 1 ? "" : "s"}`;
}

/** For API routes: throws a 429 JSON answer with Retry-After when the limit is used up. */
export async function requireWithinLimit(name: LimitName, key: string) {
  const t = await take(name, key);
  if (!t.ok) {
    throw Response.json(
      { error: `Too many requests: at most ${LIMITS[name].points} ${LIMITS[name].what} in ${waitWords(LIMITS[name].duration)}. Try again in ${waitWords(t.retryAfterS)}.` },
      { status: 429, headers: { "Retry-After": String(t.retryAfterS) } },
    );
  }
}

// Browsers that signed in to an account before: the signed list of those account ids.
export const knownDeviceCookie = createCookie("__ratebook_known", {
  httpOnly: true,
  sameSite: "lax",
  path: "/sign-in",
  secure: config.secureCookies,
  secrets: config.sessionSecrets,
  maxAge: 180 * 24 * 60 * 60,
});

export async function knownAccounts(request: Request): Promise<number[]> {
  const value = await knownDeviceCookie.parse(request.headers.get("Cookie"));
  return Array.isArray(value) ? value.filter((v): v is number => Number.isInteger(v)).slice(0, 8) : [];
}

export async function rememberAccount(request: Request, userId: number): Promise<string> {
  const ids = [userId, ...(await knownAccounts(request)).filter((id) => id !== userId)].slice(0, 8);
  return knownDeviceCookie.serialize(ids);
}

export type SignInGate = { ok: true; counted: LimitName[] } | { ok: false; retryAfterS: number };

/** Before checking a password: takes a point from each sign-in limit that applies. */
export async function beginSignIn(email: string, client: string, knownDevice: boolean): Promise<SignInGate> {
  const names: LimitName[] = ["signInPair", "signInClient", ...(knownDevice ? [] : (["signInAccount"] as LimitName[]))];
  const keys: Record<string, string[]> = { signInPair: [email, client], signInClient: [client], signInAccount: [email] };
  let wait = 0;
  for (const name of names) {
    const t = await take(name, ...keys[name]);
    if (!t.ok) wait = Math.max(wait, t.retryAfterS);
  }
  return wait > 0 ? { ok: false, retryAfterS: wait } : { ok: true, counted: names };
}

/** A right password: the points taken for this attempt are given back, and the pair starts afresh. */
export async function signInSucceeded(email: string, client: string, counted: LimitName[]) {
  await forget("signInPair", email, client);
  if (counted.includes("signInClient")) await giveBack("signInClient", client);
  if (counted.includes("signInAccount")) await giveBack("signInAccount", email);
}

/** A completed password reset proves the address: that account's sign-in failures no longer count. */
export async function liftSignInLock(email: string) {
  await forget("signInAccount", email);
  await getSequelize().query("delete from rate_limits where key like :prefix", { replacements: { prefix: `signInPair:${hashOf(email)}.%` } });
}

/** Password reset requests: per client address and per e-mail typed; null when allowed. */
export async function resetRequestLimit(request: Request, rawEmail: string): Promise<{ retryAfterS: number; message: string } | null> {
  const byClient = await take("resetClient", clientAddress(request));
  const byAddress = await take("resetAddress", normaliseEmail(rawEmail));
  const refused = [byClient, byAddress].filter((t): t is Extract<Take, { ok: false }> => !t.ok);
  if (!refused.length) return null;
  const retryAfterS = Math.max(...refused.map((t) => t.retryAfterS));
  return { retryAfterS, message: `Too many reset requests. Try again in ${waitWords(retryAfterS)}; a link already sent works for one hour.` };
}
