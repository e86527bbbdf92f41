// Calls route loaders and actions the way the framework does, with real Requests.
import { RouterContextProvider } from "react-router";
import { expect } from "vitest";
import { action as signInAction } from "~/routes/auth/sign-in";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { requestContext } from "~/.server/log.server";

const BASE = "http://127.0.0.1:3100";

type Handler = (args: any) => unknown;

export function request(path: string, init: { form?: Record<string, string>; cookie?: string; method?: string } = {}) {
  const headers = new Headers();
  if (init.cookie) headers.set("Cookie", init.cookie);
  const body = init.form ? new URLSearchParams(init.form) : undefined;
  if (body) headers.set("Content-Type", "application/x-www-form-urlencoded");
  return new Request(BASE + path, { method: init.method ?? (body ? "POST" : "GET"), headers, body });
}

/**
 * The client address the production server would record for these requests: one per test file
 * (each file is one client), so request limits of one file do not spill into another's.
 */
export const TEST_PEER = `test-client-${crypto.randomUUID()}`;

/** Runs a loader/action; a thrown Response (redirect, 4xx) is returned instead of thrown. */
export async function call(handler: Handler, req: Request, params: Record<string, string> = {}, peerAddress = TEST_PEER): Promise<any> {
  const url = new URL(req.url);
  try {
    return await requestContext.run({ requestId: "test", peerAddress }, () =>
      handler({ request: req, params, url, pattern: url.pathname, context: new RouterContextProvider() }),
    );
  } catch (thrown) {
    return thrown;
  }
}

/** The status of whatever a handler gave back: a Response, a data() result, or plain data (200). */
export function statusOf(result: any): number {
  if (result instanceof Response) return result.status;
  if (result && typeof result === "object" && "init" in result && result.type === "DataWithResponseInit") return result.init?.status ?? 200;
  return 200;
}

export function payloadOf(result: any): any {
  if (result && typeof result === "object" && result.type === "DataWithResponseInit") return result.data;
  return result;
}

export function cookieFrom(res: Response): string {
  const raw = res.headers.get("Set-Cookie") ?? "";
  return raw.split(";")[0];
}

export interface SinkMessage {
  to: string[];
  subject: string;
  text: string;
}

export async function mailTo(email: string): Promise<SinkMessage[]> {
  const res = await fetch(`${process.env.MAIL_SINK_URL}/messages`);
  const all = (await res.json()) as SinkMessage[];
  return all.filter((m) => m.to.includes(email));
}

export function linkToken(text: string, pathPrefix: string): string {
  const m = text.match(new RegExp(`${pathPrefix}/([A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`no ${pathPrefix} link in: ${text}`);
  return m[1];
}

/** Signs in through the real action and returns the session cookie. */
export async function signInAs(email: string, password: string): Promise<string> {
  const res = await call(signInAction, request("/sign-in", { form: { email, password } }));
  expect(res.status).toBe(302);
  return cookieFrom(res);
}

/** Session cookie of a demo account (invented demo data, seeded by the global setup). */
export function demoCookie(who: "admin" | "instructor" | "demonstrator" | "student") {
  return signInAs(`${who}@demo.ratebook.invalid`, `demo-${who}-pass`);
}

/**
 * Runs the job queue (every mail goes through it), then waits (up to 2.5 s) until the mail sink
 * holds `count` messages to `email`; returns them all.
 */
export async function waitForMail(email: string, count = 1): Promise<SinkMessage[]> {
  await runJobsUntilIdle();
  let mails = await mailTo(email);
  for (let i = 0; i < 50 && mails.length < count; i++) {
    await new Promise((r) => setTimeout(r, 50));
    mails = await mailTo(email);
  }
  if (mails.length < count) throw new Error(`expected ${count} mail(s) to ${email}, found ${mails.length}`);
  return mails;
}
