// Slows down password guessing: after a number of failures for one e-mail (or one client
// address) within a window, further attempts are refused until the window has passed.
// Stored in PostgreSQL so several app servers share the count.
import { Op, type Transaction } from "sequelize";
import { SignInAttempt } from "./db/models.server";
import { UNKNOWN_ADDRESS } from "./client-address.server";

export const THROTTLE = {
  windowMs: 15 * 60 * 1000,
  maxFailuresPerEmail: 5,
  maxFailuresPerIp: 25,
};

/** Milliseconds the caller must still wait, or 0 when an attempt is allowed. */
export async function throttleWait(email: string, ip: string, now = new Date()): Promise<number> {
  const since = new Date(now.getTime() - THROTTLE.windowMs);
  const checks: Array<[Record<string, string>, number]> = [[{ email }, THROTTLE.maxFailuresPerEmail]];
  // An unknown address (no trusted proxy header) would lump every client together: skip it.
  if (ip !== UNKNOWN_ADDRESS) checks.push([{ ip }, THROTTLE.maxFailuresPerIp]);
  let wait = 0;
  for (const [where, limit] of checks) {
    const failures = await SignInAttempt.findAll({
      where: { ...where, succeeded: false, createdAt: { [Op.gt]: since } },
      order: [["createdAt", "DESC"]],
      limit,
      attributes: ["createdAt"],
    });
    if (failures.length >= limit) {
      // Allowed again once the oldest of the last `limit` failures leaves the window.
      const oldest = failures[failures.length - 1].createdAt.getTime();
      wait = Math.max(wait, oldest + THROTTLE.windowMs - now.getTime());
    }
  }
  return wait;
}

/** Attempts older than this are no longer needed by any check. */
export const KEEP_ATTEMPTS_MS = 24 * 60 * 60 * 1000;

export async function recordAttempt(email: string, ip: string, succeeded: boolean, now = new Date()) {
  await SignInAttempt.create({ email, ip, succeeded });
  await SignInAttempt.destroy({ where: { createdAt: { [Op.lt]: new Date(now.getTime() - KEEP_ATTEMPTS_MS) } } });
}

/** A completed password reset proves the address: its recent failures no longer count. */
export async function liftSignInLock(email: string, transaction?: Transaction) {
  await SignInAttempt.destroy({ where: { email, succeeded: false }, transaction });
}
