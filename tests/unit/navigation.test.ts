import { describe, expect, test } from "vitest";
import { navFor } from "~/lib/navigation";

describe("navigation per role", () => {
  test("a member sees the data-set check only when they are course staff somewhere", () => {
    expect(navFor("member", false).map((i) => i.to)).toEqual(["/dashboard"]);
    expect(navFor("member", true).map((i) => i.to)).toEqual(["/dashboard", "/fit-check"]);
  });
  test("course creators may create courses; admins also manage people, mail, the audit log, the job queue and the learning platforms", () => {
    expect(navFor("course-creator", false).map((i) => i.to)).toEqual(["/dashboard", "/courses/new", "/fit-check"]);
    expect(navFor("admin", false).map((i) => i.to)).toEqual(["/dashboard", "/courses/new", "/fit-check", "/admin/people", "/admin/mail", "/admin/audit", "/admin/jobs", "/admin/lti"]);
  });
});
