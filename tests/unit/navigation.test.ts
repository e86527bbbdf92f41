import { describe, expect, test } from "vitest";
import { navFor } from "~/lib/navigation";

describe("navigation per role", () => {
  test("students and demonstrators see only their dashboard", () => {
    expect(navFor("student").map((i) => i.to)).toEqual(["/dashboard"]);
    expect(navFor("demonstrator").map((i) => i.to)).toEqual(["/dashboard"]);
  });
  test("instructors may create courses; admins also manage people, mail and the audit log", () => {
    expect(navFor("instructor").map((i) => i.to)).toEqual(["/dashboard", "/courses/new"]);
    expect(navFor("admin").map((i) => i.to)).toEqual(["/dashboard", "/courses/new", "/admin/people", "/admin/mail", "/admin/audit"]);
  });
});
