// Request bodies are counted while they stream in: past the limit the answer is 413 at once,
// and the rest of a chunked body (no Content-Length) is never pulled.
import fs from "node:fs";
import path from "node:path";
import { describe, expect, test } from "vitest";
import { action as fitAction } from "~/routes/api/fit";
import { action as signInAction } from "~/routes/auth/sign-in";
import { action as newCourseAction } from "~/routes/courses/new";
import { BODY_LIMITS, readBodyBytes } from "~/.server/body.server";
import { call, demoCookie, payloadOf, statusOf } from "./helpers";

const MiB = 1024 * 1024;

/** A body of `chunks` × 1 MiB with no declared length; `pulled()` says how many chunks were read. */
function chunkedBody(chunks: number, fill = 0x20) {
  let sent = 0;
  const stream = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (sent === chunks) return controller.close();
      sent++;
      controller.enqueue(new Uint8Array(MiB).fill(fill));
    },
  });
  return { stream, pulled: () => sent };
}

function post(url: string, body: ReadableStream<Uint8Array>, headers: Record<string, string>) {
  return new Request(`http://127.0.0.1:3100${url}`, { method: "POST", body, headers, duplex: "half" } as RequestInit);
}

describe("bounded request bodies", () => {
  test("a 20 MiB chunked JSON body to /api/fit is refused with 413 after the limit, not read whole", async () => {
    const cookie = await demoCookie("instructor");
    const body = chunkedBody(20);
    const res = await call(fitAction, post("/api/fit", body.stream, { cookie, "content-type": "application/json" }));
    expect(res.status).toBe(413);
    expect((await res.json()).errors[0].message).toMatch(/larger than the limit of 8 MiB/);
    // The limit is 8 MiB: reading stops at the ninth chunk (plus at most one the stream queued ahead).
    expect(body.pulled()).toBeLessThanOrEqual(BODY_LIMITS.json / MiB + 2);
  });

  test("a declared Content-Length above the limit is refused before reading", async () => {
    const cookie = await demoCookie("instructor");
    const body = chunkedBody(20);
    const res = await call(fitAction, post("/api/fit", body.stream, { cookie, "content-type": "application/json", "content-length": String(20 * MiB) }));
    expect(res.status).toBe(413);
    // At most the one chunk a stream queues when it is made.
    expect(body.pulled()).toBeLessThanOrEqual(1);
  });

  test("page forms have their own, smaller limit (sign-in and course creation)", async () => {
    const signIn = chunkedBody(3, 0x61);
    const res = await call(signInAction, post("/sign-in", signIn.stream, { "content-type": "application/x-www-form-urlencoded" }));
    expect(statusOf(res)).toBe(413);
    expect(payloadOf(res).message).toMatch(/larger than the limit of 64 KiB/);
    expect(signIn.pulled()).toBeLessThanOrEqual(2);
    const cookie = await demoCookie("instructor");
    const course = chunkedBody(3, 0x61);
    expect(statusOf(await call(newCourseAction, post("/courses/new", course.stream, { cookie, "content-type": "application/x-www-form-urlencoded" })))).toBe(413);
  });

  test("a body under the limit is read whole", async () => {
    const bytes = await readBodyBytes(post("/x", chunkedBody(2).stream, {}), 3 * MiB);
    expect(bytes.byteLength).toBe(2 * MiB);
  });

  test("no route module reads a body except through the helper (uploads through the upload parser)", () => {
    const dir = path.resolve(import.meta.dirname, "..", "..", "app", "routes");
    const offenders: string[] = [];
    const walk = (d: string) => {
      for (const e of fs.readdirSync(d, { withFileTypes: true })) {
        const p = path.join(d, e.name);
        if (e.isDirectory()) walk(p);
        else if (/\.tsx?$/.test(e.name)) {
          const text = fs.readFileSync(p, "utf8");
          if (/request\s*(\.clone\(\))?\s*\.\s*(formData|json|text|arrayBuffer|blob|bytes)\s*\(|request\.body\b/.test(text)) offenders.push(path.relative(dir, p));
        }
      }
    };
    walk(dir);
    expect(offenders).toEqual([]);
  });
});
