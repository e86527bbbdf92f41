import { describe, expect, test } from "vitest";
import { navFor } from "~/lib/navigation";

describe("navigation per role", () => {
  test("students see only their dashboard; demonstrators may also check a data set", () => {
    expect(navFor("student").map((i) => i.to)).toEqual(["/dashboard"]);
    expect(navFor("demonstrator").map((i) => i.to)).toEqual(["/dashboard", "/fit-check"]);
  });
  test("instructors may create courses; admins also manage people, mail and the audit log", () => {
    expect(navFor("instructor").map((i) => i.to)).toEqual(["/dashboard", "/courses/new", "/fit-check"]);
    expect(navFor("admin").map((i) => i.to)).toEqual(["/dashboard", "/courses/new", "/fit-check", "/admin/people", "/admin/mail", "/admin/audit"]);
  });
});
