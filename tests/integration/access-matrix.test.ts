// Every route in app/routes.ts, for a signed-out visitor, each demo role and a student of another
// course, GET and POST over HTTP against the built app: each answer must be the status in
// tests/access/table.ts. A route without an entry there fails.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { startAppServer } from "../browser/harness";
import { signInAs } from "./helpers";
import { leafRoutes } from "../access/routes";
import { ACCESS, SIGN_INS, VISITORS, fillUrl, makeFixtures, type Visitor } from "../access/table";

let server: Awaited<ReturnType<typeof startAppServer>>;
let fixtures: Record<string, string>;
const cookies: Partial<Record<Visitor, string>> = {};

async function signInVisitor(who: Visitor) {
  if (who === "signedOut") return;
  cookies[who] = await signInAs(SIGN_INS[who].email, SIGN_INS[who].password);
}

beforeAll(async () => {
  fixtures = await makeFixtures();
  for (const who of VISITORS) await signInVisitor(who);
  server = await startAppServer();
}, 180_000);

afterAll(() => server?.stop());

describe("access matrix", () => {
  test("every route in app/routes.ts has an entry, and every entry a route", () => {
    const files = leafRoutes().map((r) => r.file);
    expect(files.filter((f) => !(f in ACCESS)), "routes with no entry in tests/access/table.ts").toEqual([]);
    expect(Object.keys(ACCESS).filter((f) => !files.includes(f)), "entries for routes that are gone").toEqual([]);
  });

  test("every route answers each visitor with the status in the table", async () => {
    const wrong: string[] = [];
    for (const [file, entry] of Object.entries(ACCESS)) {
      const url = fillUrl(entry.url, fixtures);
      for (const method of ["GET", "POST"] as const) {
        const expected = method === "GET" ? entry.get : entry.post;
        for (const [i, who] of VISITORS.entries()) {
          const headers: Record<string, string> = {};
          if (cookies[who]) headers.cookie = cookies[who]!;
          let body: string | undefined;
          if (method === "POST") {
            body = new URLSearchParams(entry.body ?? {}).toString();
            headers["content-type"] = url.startsWith("/api/") && !entry.body ? "application/json" : "application/x-www-form-urlencoded";
          }
          const res = await fetch(server.url + url, { method, headers, body, redirect: "manual" });
          await res.arrayBuffer();
          if (res.status !== expected[i]) wrong.push(`${method} ${url} (${file}) as ${who}: got ${res.status}, want ${expected[i]}`);
          if (method === "POST" && entry.endsSession) await signInVisitor(who);
        }
      }
    }
    expect(wrong).toEqual([]);
  });
});
