// The environment every integration and browser test runs with: its own database, its own
// mail-sink ports and a cheap bcrypt cost, so a running `npm start` is never disturbed.
import { localDatabaseUrl } from "../../scripts/lib/postgres.ts";

export const TEST_SMTP_PORT = Number(process.env.TEST_MAIL_SMTP_PORT ?? 2535);
export const TEST_MAIL_HTTP_PORT = Number(process.env.TEST_MAIL_HTTP_PORT ?? 2536);
export const TEST_APP_PORT = Number(process.env.TEST_APP_PORT ?? 3100);
/** The fake institution's OpenID provider (scripts/lib/fake-institution.ts), 50 above the app's test port unless set. */
export const TEST_OIDC_PORT = Number(process.env.TEST_OIDC_PORT ?? TEST_APP_PORT + 50);
/** The fake learning platform (scripts/lib/fake-platform.ts), 51 above the app's test port unless set. */
export const TEST_LTI_PORT = Number(process.env.TEST_LTI_PORT ?? TEST_APP_PORT + 51);
export const TEST_LTI = { clientId: "ratebook-tool-test", deploymentId: "dep-test-1" };
export const TEST_OIDC_CLIENT = {
  client_id: "ratebook-test",
  client_secret: "test-only-oidc-client-secret",
  redirect_uris: [`http://127.0.0.1:${TEST_APP_PORT}/sign-in/institution/return`],
};

export const testEnv: Record<string, string> = {
  DATABASE_URL: process.env.TEST_DATABASE_URL ?? localDatabaseUrl("ratebook_test"),
  SMTP_URL: `smtp://127.0.0.1:${TEST_SMTP_PORT}`,
  MAIL_SINK_URL: `http://127.0.0.1:${TEST_MAIL_HTTP_PORT}`,
  SESSION_SECRET: "test-only-session-secret-at-least-32-characters",
  BCRYPT_COST: "4",
  APP_URL: `http://127.0.0.1:${TEST_APP_PORT}`,
  OIDC_ISSUER: `http://127.0.0.1:${TEST_OIDC_PORT}`,
  OIDC_CLIENT_ID: TEST_OIDC_CLIENT.client_id,
  OIDC_CLIENT_SECRET: TEST_OIDC_CLIENT.client_secret,
  OIDC_ID_CLAIM: "student_number",
};
