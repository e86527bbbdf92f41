// When PostgreSQL is down or restarting, requests must get a clear 503 at once (not hang, not a
// 500 page), and nothing half-done may stay behind (every write here is one transaction).
import { data } from "react-router";

// SQLSTATE classes and codes meaning "the server is not there right now" (PostgreSQL manual,
// Appendix A: class 08 connection exception, 57P01 admin shutdown, 57P02 crash shutdown,
// 57P03 cannot connect now).
const DOWN_CODES = new Set(["57P01", "57P02", "57P03", "ECONNREFUSED", "ECONNRESET", "EPIPE", "ETIMEDOUT"]);
const DOWN_NAMES = /^Sequelize(Connection|ConnectionRefused|HostNotFound|HostNotReachable|ConnectionTimedOut|ConnectionAcquireTimeout|InvalidConnection|AccessDenied)Error$/;
const DOWN_TEXT = /Connection terminated|terminating connection|the database system is (starting up|shutting down|in recovery mode)|connect ECONNREFUSED|Client has encountered a connection error|Connection ended unexpectedly/i;

export function isDatabaseDown(error: unknown): boolean {
  for (let e: unknown = error, depth = 0; e && depth < 4; depth++) {
    const err = e as { name?: string; code?: string; message?: string; original?: unknown; parent?: unknown; cause?: unknown };
    if (err.name && DOWN_NAMES.test(err.name)) return true;
    if (err.code && (DOWN_CODES.has(err.code) || err.code.startsWith("08"))) return true;
    if (err.message && DOWN_TEXT.test(err.message)) return true;
    e = err.original ?? err.parent ?? err.cause;
  }
  return false;
}

export const DATABASE_DOWN_MESSAGE =
  "Ratebook's database is not reachable for a moment (it may be restarting). Nothing was stored. Try again in a few seconds.";

/** Runs a loader or action; a database outage becomes a 503 (JSON for the API, a page error otherwise). */
export async function whileDatabaseUp<T>(api: boolean, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (error) {
    if (error instanceof Response || !isDatabaseDown(error)) throw error;
    if (api) throw Response.json({ error: DATABASE_DOWN_MESSAGE }, { status: 503, headers: { "Retry-After": "5" } });
    throw data({ message: DATABASE_DOWN_MESSAGE }, { status: 503, headers: { "Retry-After": "5" } });
  }
}
