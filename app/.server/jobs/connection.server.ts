// How graphile-worker reaches the database the app uses, and a logger that keeps its routine
// chatter out of the console (warnings and errors still show).
import { Logger } from "graphile-worker";
// the library's internal module, for its table of retried error codes (see below)
import gwLib from "graphile-worker/dist/lib.js";
import type { Sequelize } from "sequelize";

/** A connection string for the database a Sequelize instance talks to. */
export function connectionStringOf(sequelize: Sequelize): string {
  const c = sequelize.config as { username?: string; password?: string | null; host?: string; port?: string | number; database: string };
  const auth = c.username ? `${encodeURIComponent(c.username)}${c.password ? `:${encodeURIComponent(c.password)}` : ""}@` : "";
  return `postgres://${auth}${c.host ?? "127.0.0.1"}:${c.port ?? 5432}/${encodeURIComponent(c.database)}`;
}

export const quietWorkerLogger = new Logger((scope) => (level, message) => {
  if (level === "error" || level === "warning") console.error(`[jobs] ${level}${scope.taskIdentifier ? ` ${scope.taskIdentifier}` : ""}: ${message}`);
});

// graphile-worker 0.17.3 records a job's end (completeJob/failJob) through `withRetries`, which
// retries only the error codes in its RETRYABLE_ERROR_CODES table, and nobody awaits that promise
// (worker.js calls completeJob(job) and failJob(spec) without await). So an error it does not
// retry rejects into the void: Node ends the process. A PostgreSQL restart gives exactly such
// errors: 57P01 "terminating connection due to administrator command" on the connections that
// were open, then ECONNREFUSED while the server is down. We add the codes that mean "the server
// went away or is not there yet" (PostgreSQL's class 08 and 57P01/57P02, and the socket errors),
// so the end of a job is recorded once the server is back instead of being thrown away.
// The table is the library's own object (the module is shared with worker.js), changed once here.
const CONNECTION_LOST_CODES = [
  "57P01", // admin_shutdown
  "57P02", // crash_shutdown
  "08000", // connection_exception
  "08001", // sqlclient_unable_to_establish_sqlconnection
  "08003", // connection_does_not_exist
  "08006", // connection_failure
  "ECONNREFUSED",
  "ECONNRESET",
  "EPIPE",
];
const retryable = (gwLib as unknown as { RETRYABLE_ERROR_CODES: Record<string, { minDelay: number; maxDelay: number } | undefined> }).RETRYABLE_ERROR_CODES;
for (const code of CONNECTION_LOST_CODES) retryable[code] ??= { minDelay: 200, maxDelay: 5000 };

/** The codes graphile-worker now retries when it records a job's end (tests read it). */
export const retriedConnectionCodes = CONNECTION_LOST_CODES;
