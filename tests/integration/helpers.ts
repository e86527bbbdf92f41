// Calls route loaders and actions the way the framework does, with real Requests.
import { RouterContextProvider } from "react-router";

const BASE = "http://127.0.0.1:3100";

type Handler = (args: any) => unknown;

export function request(path: string, init: { form?: Record<string, string>; cookie?: string; method?: string } = {}) {
  const headers = new Headers();
  if (init.cookie) headers.set("Cookie", init.cookie);
  const body = init.form ? new URLSearchParams(init.form) : undefined;
  if (body) headers.set("Content-Type", "application/x-www-form-urlencoded");
  return new Request(BASE + path, { method: init.method ?? (body ? "POST" : "GET"), headers, body });
}

/** Runs a loader/action; a thrown Response (redirect, 4xx) is returned instead of thrown. */
export async function call(handler: Handler, req: Request, params: Record<string, string> = {}): Promise<any> {
  const url = new URL(req.url);
  try {
    return await handler({ request: req, params, url, pattern: url.pathname, context: new RouterContextProvider() });
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
