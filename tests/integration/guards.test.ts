// Role guards: pages redirect or show 403, API routes answer 401/403 JSON.
import { describe, expect, test } from "vitest";
import { loader as newCourseLoader, action as newCourseAction } from "~/routes/courses/new";
import { loader as peopleLoader } from "~/routes/admin/people";
import { loader as courseLoader, action as courseAction } from "~/routes/courses/course";
import { loader as meLoader } from "~/routes/api/me";
import { loader as dashboardLoader } from "~/routes/dashboard";
import { call, demoCookie, payloadOf, request, statusOf } from "./helpers";

describe("role guards", () => {
  test("signed-out visitor to a page is sent to sign-in with a return address", async () => {
    const res = await call(dashboardLoader, request("/dashboard?tab=x"));
    expect(res.status).toBe(302);
    expect(res.headers.get("Location")).toBe("/sign-in?returnTo=%2Fdashboard%3Ftab%3Dx");
  });

  test("signed-out call to the API gets 401 JSON", async () => {
    const res = await call(meLoader, request("/api/me"));
    expect(res.status).toBe(401);
    expect(await res.json()).toEqual({ error: "Sign in first." });
  });

  test("a student gets 403 on instructor pages and actions", async () => {
    const cookie = await demoCookie("student");
    const page = await call(newCourseLoader, request("/courses/new", { cookie }));
    expect(statusOf(page)).toBe(403);
    expect(payloadOf(page).message).toMatch(/account of type administrator or course creator; yours is member/);
    const post = await call(newCourseAction, request("/courses/new", { cookie, form: { code: "X1", title: "X" } }));
    expect(statusOf(post)).toBe(403);
    const invite = await call(courseAction, request("/courses/1", { cookie, form: { intent: "invite", email: "x@y.invalid", displayName: "X", role: "student" } }), { courseId: "1" });
    expect(statusOf(invite)).toBe(403);
  });

  test("an instructor gets 403 on admin pages but may create a course", async () => {
    const cookie = await demoCookie("instructor");
    expect(statusOf(await call(peopleLoader, request("/admin/people", { cookie })))).toBe(403);
    const created = await call(newCourseAction, request("/courses/new", { cookie, form: { code: "GUARD-1", title: "Guard test course", term: "" } }));
    expect(created.status).toBe(302);
    expect(created.headers.get("Location")).toMatch(/^\/courses\/\d+$/);
  });

  test("course pages need membership; unknown course is 404", async () => {
    const instructor = await demoCookie("instructor");
    const created = await call(newCourseAction, request("/courses/new", { cookie: instructor, form: { code: "GUARD-2", title: "Private course", term: "" } }));
    const id = created.headers.get("Location")!.split("/").pop()!;
    const student = await demoCookie("student");
    expect(statusOf(await call(courseLoader, request(`/courses/${id}`, { cookie: student }), { courseId: id }))).toBe(403);
    expect(statusOf(await call(courseLoader, request(`/courses/999999`, { cookie: instructor }), { courseId: "999999" }))).toBe(404);
    expect(statusOf(await call(courseLoader, request(`/courses/abc`, { cookie: instructor }), { courseId: "abc" }))).toBe(404);
  });

  test("admin may open admin pages; API returns the person and their courses", async () => {
    const admin = await demoCookie("admin");
    const people = payloadOf(await call(peopleLoader, request("/admin/people", { cookie: admin })));
    expect(people.users.some((u: { email: string }) => u.email === "student@demo.ratebook.invalid")).toBe(true);
    const student = await demoCookie("student");
    const me = await (await call(meLoader, request("/api/me", { cookie: student }))).json();
    expect(me.user).toMatchObject({ email: "student@demo.ratebook.invalid", role: "member" });
    expect(me.courses.map((c: { code: string }) => c.code)).toContain("KIN-DEMO");
  });

  test("course creation keeps the typed values and names the field on bad input", async () => {
    const cookie = await demoCookie("instructor");
    const res = await call(newCourseAction, request("/courses/new", { cookie, form: { code: "KIN-DEMO", title: "", term: "Demo term" } }));
    expect(statusOf(res)).toBe(400);
    expect(payloadOf(res).errors).toMatchObject({ code: expect.stringMatching(/exists already in Demo term/), title: "Enter the course title." });
    expect(payloadOf(res).values).toMatchObject({ code: "KIN-DEMO", term: "Demo term" });
  });
});
