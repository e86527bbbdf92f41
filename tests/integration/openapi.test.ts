// Keeps the OpenAPI document true: every operation it describes is called on the running app,
// once signed in (the answer must be a documented status and match its schema) and once with no
// credentials (401, unless the operation needs none).
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { startAppServer } from "../browser/harness";
import { demoCookie } from "./helpers";
import { schemaProblems } from "./json-schema";
import { pathParameterValues } from "./openapi-params";

let server: Awaited<ReturnType<typeof startAppServer>>;
let doc: any;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  server = await startAppServer();
  const res = await fetch(`${server.url}/api/openapi.json`);
  expect(res.status).toBe(200);
  doc = await res.json();
  for (const who of ["instructor", "student", "admin"] as const) cookies[who] = await demoCookie(who);
}, 180_000);

afterAll(() => server?.stop());

/** An example body may name demo ids as "{name}"; they become numbers from the same values. */
function fillExample(example: unknown, values: Record<string, number | string>): unknown {
  return JSON.parse(JSON.stringify(example), (_, v) => (typeof v === "string" && /^\{\w+\}$/.test(v) ? Number(values[v.slice(1, -1)]) : v));
}

function operations() {
  const ops: Array<{ path: string; method: string; op: any }> = [];
  for (const [path, item] of Object.entries<any>(doc.paths)) for (const [method, op] of Object.entries<any>(item)) ops.push({ path, method, op });
  return ops;
}

describe("OpenAPI document", () => {
  test("is OpenAPI 3.1 and every $ref resolves", () => {
    expect(doc.openapi).toBe("3.1.0");
    const text = JSON.stringify(doc);
    for (const m of text.matchAll(/"#\/components\/schemas\/([^"]+)"/g)) expect(doc.components.schemas, m[1]).toHaveProperty(m[1]);
    expect(operations().length).toBeGreaterThanOrEqual(4);
  });

  test("every operation answers as documented, signed in and signed out", async () => {
    const values = await pathParameterValues();
    const called: string[] = [];
    for (const { path, method, op } of operations()) {
      const url = path.replace(/\{(\w+)\}/g, (_, name: string) => {
        const v = values[name];
        if (v === undefined) throw new Error(`tests/integration/openapi-params.ts has no value for {${name}} (used by ${path})`);
        return String(v);
      });
      const example = op.requestBody?.content?.["application/json"]?.example;
      // multipart operations (uploads) carry an "x-test-example": { file: { name, type, text }, fields }
      const multipart = op.requestBody?.content?.["multipart/form-data"]?.["x-test-example"];
      const formBody = () => {
        const form = new FormData();
        for (const [k, v] of Object.entries<string>(multipart.fields ?? {})) form.append(k, v);
        form.append("file", new Blob([multipart.file.text], { type: multipart.file.type }), multipart.file.name);
        return form;
      };
      const init = (cookie?: string): RequestInit => ({
        method: method.toUpperCase(),
        headers: {
          ...(cookie ? { Cookie: cookie } : {}),
          ...(example ? { "Content-Type": "application/json" } : {}),
          Origin: server.url,
        },
        body: example ? JSON.stringify(fillExample(example, values)) : multipart ? formBody() : undefined,
      });
      const who = op["x-test-caller"] ?? "instructor";
      const res = await fetch(server.url + url, init(cookies[who]));
      const where = `${method.toUpperCase()} ${url} as ${who}`;
      expect(Object.keys(op.responses), `${where} answered ${res.status}`).toContain(String(res.status));
      expect(res.status, where).toBeLessThan(300);
      const documented = op.responses[String(res.status)].content ?? {};
      // 204 No Content (e.g. a revoked token) has no body to check.
      if (res.status === 204) {
        await res.arrayBuffer();
      } else if (documented["application/json"]) {
        expect(res.headers.get("content-type") ?? "", where).toContain("application/json");
        const body = await res.json();
        expect(schemaProblems(body, documented["application/json"].schema, doc.components.schemas), where).toEqual([]);
      } else {
        // a download: its content type is one the document names
        const type = (res.headers.get("content-type") ?? "").split(";")[0];
        expect(Object.keys(documented), where).toContain(type);
        await res.arrayBuffer();
      }

      const needsNoAuth = Array.isArray(op.security) && op.security.length === 0;
      if (!needsNoAuth) {
        const anon = await fetch(server.url + url, init());
        expect(anon.status, `${method.toUpperCase()} ${url} signed out`).toBe(401);
        expect(await anon.json()).toHaveProperty("error");
      }
      called.push(`${method} ${path}`);
    }
    expect(called.length).toBe(operations().length);
  });
});
