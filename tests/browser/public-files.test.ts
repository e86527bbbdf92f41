// The built app serves the project's own public/ files: a favicon linked from every page and a
// robots.txt that keeps the signed-in area out of search engines.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startAppServer } from "./harness";

let app: { url: string; stop: () => void };
beforeAll(async () => {
  app = await startAppServer();
});
afterAll(() => app?.stop());

describe("public files", () => {
  it("serves robots.txt that disallows everything but the front and sign-in pages", async () => {
    const res = await fetch(`${app.url}/robots.txt`);
    expect(res.status).toBe(200);
    const text = await res.text();
    // robots.txt rules (RFC 9309): the longest matching rule wins, so "Disallow: /" covers the rest.
    expect(text).toMatch(/^User-agent: \*$/m);
    expect(text).toMatch(/^Disallow: \/$/m);
    expect(text).toMatch(/^Allow: \/sign-in$/m);
  });

  it("serves the favicon and links it from the sign-in page", async () => {
    const icon = await fetch(`${app.url}/favicon.svg`);
    expect(icon.status).toBe(200);
    expect(await icon.text()).toContain("<svg");
    const page = await (await fetch(`${app.url}/sign-in`)).text();
    // Attributes in any order (the CSP nonce comes first).
    expect(page).toMatch(/<link [^>]*rel="icon" href="\/favicon.svg"/);
  });
});
