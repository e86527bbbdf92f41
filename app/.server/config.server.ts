// Runtime settings from the environment, with development defaults that work on loopback.
const DEV_SECRET = "ratebook-development-secret-change-me";

function int(name: string, fallback: number) {
  const v = process.env[name];
  return v ? Number(v) : fallback;
}

/** Shortest session secret accepted in production (256 bits of hex or base64 is 43-64 characters). */
export const MIN_SECRET_LENGTH = 32;

/**
 * SESSION_SECRET may list several secrets, separated by commas or spaces: the first signs new
 * cookies, every one still verifies, so a secret is rotated by putting the new one first and
 * removing the old one a session lifetime later.
 */
export function sessionSecretsFrom(value: string | undefined): string[] {
  const list = (value ?? "").split(/[\s,]+/).filter(Boolean);
  return list.length ? list : [DEV_SECRET];
}

/**
 * Worker threads of the compute pool (app/.server/compute/pool.server.ts): COMPUTE_THREADS, by
 * default one less than the CPUs Node may use (at least 1), so the request thread keeps a core;
 * 0 runs the work on the request thread (for comparison in benchmarks, or a one-core machine).
 */
export function computeThreadsFrom(value: string | undefined, cpus: number): { threads: number; problem: string | null } {
  const fallback = Math.max(1, cpus - 1);
  if (value === undefined || value.trim() === "") return { threads: fallback, problem: null };
  const n = Number(value);
  if (!Number.isInteger(n) || n < 0 || n > 64) {
    return { threads: fallback, problem: `COMPUTE_THREADS (${value}) must be a whole number from 0 to 64: the worker threads for fits and workbooks (0 runs them on the request thread; unset: ${fallback} here).` };
  }
  return { threads: n, problem: null };
}

/** What stops a production server or worker from starting (empty when it may start). */
export function productionConfigProblems(env: NodeJS.ProcessEnv = process.env, part: "server" | "worker" = "server"): string[] {
  if (env.NODE_ENV !== "production") return [];
  const problems: string[] = [];
  if (part === "server") problems.push(...secretProblems(env), ...ssoProblems(env));
  const threads = computeThreadsFrom(env.COMPUTE_THREADS, 1).problem;
  if (threads) problems.push(threads);
  if (!env.APP_URL) problems.push("APP_URL is not set: set it to the address people use, e.g. https://ratebook.example.org (page forms are accepted only from it; mailed links use it).");
  else {
    try {
      new URL(env.APP_URL);
    } catch {
      problems.push(`APP_URL (${env.APP_URL}) is not a URL: write it as https://host[:port].`);
    }
  }
  return problems;
}

/**
 * Single sign-on through the institution's OpenID Connect provider: on when issuer, client id
 * and secret are all set. OIDC_ID_CLAIM names a claim (e.g. "student_number") matched against the
 * roster's student number when the e-mail does not match an account.
 */
export function ssoConfigFrom(env: NodeJS.ProcessEnv = process.env) {
  const issuer = env.OIDC_ISSUER?.trim();
  const clientId = env.OIDC_CLIENT_ID?.trim();
  const clientSecret = env.OIDC_CLIENT_SECRET;
  if (!issuer || !clientId || !clientSecret) return null;
  return {
    issuer,
    clientId,
    clientSecret,
    idClaim: env.OIDC_ID_CLAIM?.trim() || null,
    /** the institution's name on the button, e.g. "Northfield University" */
    label: env.OIDC_LABEL?.trim() || null,
  };
}
export type SsoConfig = NonNullable<ReturnType<typeof ssoConfigFrom>>;

function ssoProblems(env: NodeJS.ProcessEnv): string[] {
  const set = ["OIDC_ISSUER", "OIDC_CLIENT_ID", "OIDC_CLIENT_SECRET"].filter((n) => env[n]);
  if (set.length === 0) return [];
  if (set.length < 3) return [`Single sign-on needs OIDC_ISSUER, OIDC_CLIENT_ID and OIDC_CLIENT_SECRET together; only ${set.join(" and ")} ${set.length === 1 ? "is" : "are"} set.`];
  try {
    const url = new URL(env.OIDC_ISSUER!);
    if (url.protocol !== "https:" && !isLoopback(url.hostname)) return [`OIDC_ISSUER (${env.OIDC_ISSUER}) must be an https:// address.`];
  } catch {
    return [`OIDC_ISSUER (${env.OIDC_ISSUER}) is not a URL: write it as https://host/path, as the provider's discovery document names it.`];
  }
  return [];
}

/** Plain http is accepted only for a provider on this machine (the local fake). */
export function isLoopback(hostname: string) {
  return hostname === "127.0.0.1" || hostname === "localhost" || hostname === "[::1]";
}

function secretProblems(env: NodeJS.ProcessEnv): string[] {
  const problems: string[] = [];
  const secrets = (env.SESSION_SECRET ?? "").split(/[\s,]+/).filter(Boolean);
  if (!secrets.length) problems.push("SESSION_SECRET is not set: set it to a long random string (e.g. `openssl rand -hex 32`), the same on every app server.");
  const short = secrets.filter((s) => s.length < MIN_SECRET_LENGTH || s === DEV_SECRET);
  if (short.length) problems.push(`SESSION_SECRET: ${short.length === 1 && secrets.length === 1 ? "the secret" : `${short.length} of its ${secrets.length} secrets`} ${short.length === 1 ? "is" : "are"} shorter than ${MIN_SECRET_LENGTH} characters or the development default; use a long random string (e.g. \`openssl rand -hex 32\`).`);
  return problems;
}

export const config = {
  databaseUrl: process.env.DATABASE_URL ?? `postgres://ratebook@127.0.0.1:${int("RATEBOOK_PG_PORT", 54329)}/ratebook`,
  /** the first signs; all verify (rotation) */
  sessionSecrets: sessionSecretsFrom(process.env.SESSION_SECRET),
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
  sso: ssoConfigFrom(process.env),
};
