// How graphile-worker reaches the database the app uses, and a logger that keeps its routine
// chatter out of the console (warnings and errors still show).
import { Logger } from "graphile-worker";
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
