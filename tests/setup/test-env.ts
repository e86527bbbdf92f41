// The environment every integration and browser test runs with: its own database, its own
// mail-sink ports and a cheap bcrypt cost, so a running `npm start` is never disturbed.
import { localDatabaseUrl } from "../../scripts/lib/postgres.ts";

export const TEST_SMTP_PORT = Number(process.env.TEST_MAIL_SMTP_PORT ?? 2535);
export const TEST_MAIL_HTTP_PORT = Number(process.env.TEST_MAIL_HTTP_PORT ?? 2536);
export const TEST_APP_PORT = Number(process.env.TEST_APP_PORT ?? 3100);

export const testEnv: Record<string, string> = {
  DATABASE_URL: process.env.TEST_DATABASE_URL ?? localDatabaseUrl("ratebook_test"),
  SMTP_URL: `smtp://127.0.0.1:${TEST_SMTP_PORT}`,
  MAIL_SINK_URL: `http://127.0.0.1:${TEST_MAIL_HTTP_PORT}`,
  SESSION_SECRET: "test-only-session-secret-at-least-32-characters",
  BCRYPT_COST: "4",
  APP_URL: `http://127.0.0.1:${TEST_APP_PORT}`,
};
