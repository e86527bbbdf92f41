import { describe, expect, test } from "vitest";
import { safeReturnTo } from "./return-to";

// Hostile return addresses: each must fall back to the dashboard. The list follows the usual
// open-redirect tricks (common practice, no source): protocol-relative, backslash, control
// characters that browsers strip, encoded forms, schemes, userinfo, non-ASCII.
const HOSTILE = [
  "//evil.example",
  "///evil.example",
  "/\\evil.example",
  "\\\\evil.example",
  "/\t/evil.example",
  "/\n/evil.example",
  "/\r\n/evil.example",
  "/\r\nSet-Cookie: x=1",
  "/ /evil.example",
  "/\u00a0/evil.example",
  "/\u200b/evil.example",
  "/\u202e/evil.example",
  "/\u3000/evil.example",
  "/\u0000/evil.example",
  "/.//evil.example",
  "/./\t/evil.example",
  "/../..//evil.example",
  "https://evil.example",
  "http:evil.example",
  "javascript:alert(1)",
  "data:text/html,x",
  "evil.example",
  "@evil.example",
  "",
  " /dashboard",
  "/" + "a".repeat(3000),
  null,
  undefined,
  42,
  ["/courses/1"],
];

describe("safeReturnTo", () => {
  test.each(HOSTILE.map((h) => [JSON.stringify(h), h]))("refuses %s", (_label, raw) => {
    expect(safeReturnTo(raw)).toBe("/dashboard");
  });

  test("keeps ordinary paths, queries and fragments", () => {
    expect(safeReturnTo("/courses/1")).toBe("/courses/1");
    expect(safeReturnTo("/sessions/4/review?tab=flagged#row-3")).toBe("/sessions/4/review?tab=flagged#row-3");
    expect(safeReturnTo("/")).toBe("/");
  });

  test("non-ASCII in a path comes back percent-encoded (a header can carry it)", () => {
    expect(safeReturnTo("/courses/é")).toBe("/courses/%C3%A9");
  });

  test("what comes out is always a same-app ASCII path", () => {
    for (const raw of ["/a/../b", "/a/%2e%2e/b", "/%2F%2Fevil.example", "/a?x=//evil"]) {
      const out = safeReturnTo(raw);
      expect(out.startsWith("/") && !out.startsWith("//")).toBe(true);
      expect(/^[\x21-\x7e]+$/.test(out)).toBe(true);
    }
  });

  test("another fallback can be given", () => {
    expect(safeReturnTo("//evil.example", "/account")).toBe("/account");
  });
});
