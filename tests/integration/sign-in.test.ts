// Sign-in through the real route action against the test database (demo data seeded).
import { describe, expect, test } from "vitest";
import { action as signIn, loader as signInLoader } from "~/routes/auth/sign-in";
import { GENERIC_FAILURE } from "~/.server/auth.server";
import { THROTTLE } from "~/.server/throttle.server";
import { User } from "~/.server/db/models.server";
import { hashPassword } from "~/.server/passwords.server";
import { call, cookieFrom, payloadOf, request, statusOf } from "./helpers";

const form = (email: string, password: string, returnTo = "/dashboard") => request("/sign-in", { form: { email, password, returnTo } });

describe("sign-in", () => {
  test("right password: redirect to the return address with an HttpOnly, SameSite=Lax session cookie", async () => {
    const res = await call(signIn, form("instructor@demo.ratebook.invalid", "demo-instructor-pass", "/courses/1"));
    expect(res).toBeInstanceOf(Response);
    expect(res.status).toBe(302);
    expect(res.headers.get("Location")).toBe("/courses/1");
    const setCookie = res.headers.get("Set-Cookie");
    expect(setCookie).toMatch(/__ratebook_session=/);
    expect(setCookie).toMatch(/HttpOnly/i);
    expect(setCookie).toMatch(/SameSite=Lax/i);
  });

  test("e-mail is matched without regard to case or surrounding spaces", async () => {
    const res = await call(signIn, form("  Instructor@Demo.Ratebook.INVALID ", "demo-instructor-pass"));
    expect(res.status).toBe(302);
  });

  test("a return address outside the app is ignored", async () => {
    const res = await call(signIn, form("instructor@demo.ratebook.invalid", "demo-instructor-pass", "//evil.invalid/x"));
    expect(res.headers.get("Location")).toBe("/dashboard");
  });

  test("wrong password and unknown e-mail give the same generic message", async () => {
    const wrong = await call(signIn, form("demonstrator@demo.ratebook.invalid", "not-the-password"));
    const unknown = await call(signIn, form("nobody@demo.ratebook.invalid", "not-the-password"));
    expect(statusOf(wrong)).toBe(400);
    expect(statusOf(unknown)).toBe(400);
    expect(payloadOf(wrong).error).toBe(GENERIC_FAILURE);
    expect(payloadOf(unknown).error).toBe(GENERIC_FAILURE);
    // The typed e-mail comes back so the form keeps it.
    expect(payloadOf(wrong).email).toBe("demonstrator@demo.ratebook.invalid");
  });

  test("empty and malformed input get a message beside the right field", async () => {
    expect(payloadOf(await call(signIn, form("", "x")))).toMatchObject({ field: "email", error: "Enter your e-mail address." });
    expect(payloadOf(await call(signIn, form("not-an-email", "x")))).toMatchObject({ field: "email" });
    expect(payloadOf(await call(signIn, form("a@b.invalid", "")))).toMatchObject({ field: "password", error: "Enter your password." });
  });

  test("repeated failures for one e-mail are refused for a while, even with the right password", async () => {
    const email = "throttle-target@demo.ratebook.invalid";
    await User.create({ email, displayName: "Throttle target (test)", role: "member", passwordHash: await hashPassword("right-password-1") });
    for (let i = 0; i < THROTTLE.maxFailuresPerEmail; i++) {
      expect(payloadOf(await call(signIn, form(email, `wrong-${i}`))).error).toBe(GENERIC_FAILURE);
    }
    const blocked = await call(signIn, form(email, "right-password-1"));
    expect(statusOf(blocked)).toBe(429);
    expect(blocked.init.headers["Retry-After"]).toMatch(/^\d+$/);
    expect(payloadOf(blocked).error).toMatch(/Too many sign-in attempts\. Try again in 1[45] minutes/);
    // Another account is not affected.
    expect((await call(signIn, form("student@demo.ratebook.invalid", "demo-student-pass"))).status).toBe(302);
  });

  test("a signed-in visitor to the sign-in page goes on to the return address", async () => {
    const ok = await call(signIn, form("student@demo.ratebook.invalid", "demo-student-pass"));
    const res = await call(signInLoader, request("/sign-in?returnTo=%2Fcourses%2F1", { cookie: cookieFrom(ok) }));
    expect(res.status).toBe(302);
    expect(res.headers.get("Location")).toBe("/courses/1");
  });
});

describe("return address after sign-in", () => {
  // Browsers drop tabs and line breaks from a Location, so "/\t/evil" would become "//evil";
  // a line break or non-ASCII character in a header value used to throw (500).
  test.each(["/%09/evil.example", "/%0a/evil.example", "/%0d%0aSet-Cookie:%20x=1", "/%E2%80%AE/evil", "/caf%C3%A9//x", "/.//evil.example"])(
    "a signed-in visitor with returnTo=%s stays in the app",
    async (raw) => {
      const ok = await call(signIn, form("student@demo.ratebook.invalid", "demo-student-pass"));
      const res = await call(signInLoader, request(`/sign-in?returnTo=${raw}`, { cookie: cookieFrom(ok) }));
      expect(res.status).toBe(302);
      const location = res.headers.get("Location")!;
      expect(location.startsWith("/") && !location.startsWith("//")).toBe(true);
      expect(/^[\x21-\x7e]+$/.test(location)).toBe(true);
    },
  );

  test("the sign-in form's hidden field goes through the same parser", async () => {
    const res = await call(signIn, form("student@demo.ratebook.invalid", "demo-student-pass", "/\t/evil.example"));
    expect(res.headers.get("Location")).toBe("/dashboard");
    const crlf = await call(signIn, form("student@demo.ratebook.invalid", "demo-student-pass", "/x\r\nSet-Cookie: a=b"));
    expect(crlf.status).toBe(302);
    expect(crlf.headers.get("Location")).toBe("/dashboard");
  });
});
