// Ids in paths and forms are parsed in one place: a bad one is a 400 or 404 with a message,
// never a 500 with NaN sent to the database.
import { describe, expect, test } from "vitest";
import { action as courseAction, loader as courseLoader } from "~/routes/courses/course";
import { action as peopleAction } from "~/routes/admin/people";
import { Course } from "~/.server/db/models.server";
import { parseId } from "~/.server/ids.server";
import { call, demoCookie, payloadOf, request, statusOf } from "./helpers";

describe("ids", () => {
  test("parseId takes plain positive integers that fit an int4 and nothing else", () => {
    expect(parseId("17")).toBe(17);
    expect(parseId(" 17 ")).toBe(17);
    expect(parseId("2147483647")).toBe(2147483647);
    for (const bad of ["", "0", "-1", "1.5", "1e3", "0x10", "abc", "17abc", "2147483648", "99999999999", null, undefined, {}]) {
      expect(parseId(bad as never)).toBeNull();
    }
  });

  test("a non-numeric id in the course role-change form is a 400 with a message", async () => {
    const cookie = await demoCookie("instructor");
    const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
    const id = String(course!.id);
    for (const membershipId of ["abc", "", "1e3", "99999999999"]) {
      const res = await call(courseAction, request(`/courses/${id}`, { cookie, form: { intent: "change-role", membershipId, role: "student" } }), { courseId: id });
      expect(statusOf(res)).toBe(400);
      expect(payloadOf(res).errors.form).toMatch(/reload the page/);
    }
  });

  test("a non-numeric id in the admin people role form is a 400 with a message", async () => {
    const cookie = await demoCookie("admin");
    for (const userId of ["abc", "NaN", "-3"]) {
      const res = await call(peopleAction, request("/admin/people", { cookie, form: { userId, role: "student" } }));
      expect(statusOf(res)).toBe(400);
      expect(payloadOf(res).errors.form).toMatch(/reload the page/);
    }
  });

  test("bad course ids in the path are 404 pages", async () => {
    const cookie = await demoCookie("instructor");
    for (const courseId of ["abc", "1.0", "99999999999", "0"]) {
      const res = await call(courseLoader, request(`/courses/${courseId}`, { cookie }), { courseId });
      expect(statusOf(res)).toBe(404);
      expect(payloadOf(res).message).toBe("There is no course at this address.");
    }
  });
});
