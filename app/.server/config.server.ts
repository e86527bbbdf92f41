// Runtime settings from the environment, with development defaults that work on loopback.
const DEV_SECRET = "ratebook-development-secret-change-me";

function int(name: string, fallback: number) {
  const v = process.env[name];
  return v ? Number(v) : fallback;
}

export const config = {
  databaseUrl: process.env.DATABASE_URL ?? `postgres://ratebook@127.0.0.1:${int("RATEBOOK_PG_PORT", 54329)}/ratebook`,
  sessionSecret: process.env.SESSION_SECRET ?? DEV_SECRET,
  usingDevSecret: !process.env.SESSION_SECRET,
  smtpUrl: process.env.SMTP_URL ?? `smtp://127.0.0.1:${int("MAIL_SINK_SMTP_PORT", 2525)}`,
  mailFrom: process.env.MAIL_FROM ?? "Ratebook <no-reply@ratebook.invalid>",
  /** The local mail sink's read API; unset in production, where mail goes to a real server. */
  mailSinkUrl: process.env.MAIL_SINK_URL ?? (process.env.SMTP_URL ? null : `http://127.0.0.1:${int("MAIL_SINK_HTTP_PORT", 2526)}`),
  appUrl: (process.env.APP_URL ?? `http://localhost:${int("PORT", 3000)}`).replace(/\/$/, ""),
  /** Secure cookies need HTTPS; on by default in production, off for the local http demo. */
  secureCookies: process.env.SESSION_COOKIE_SECURE ? process.env.SESSION_COOKIE_SECURE === "1" : process.env.NODE_ENV === "production",
  /** Behind a load balancer, trust X-Forwarded-For for the client address (sign-in throttling). */
  trustProxy: process.env.TRUST_PROXY === "1",
};
