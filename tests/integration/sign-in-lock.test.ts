// The lock message recommends a reset; a completed reset must then let the new password in.
import { describe, expect, test } from "vitest";
import { action as signInAction } from "~/routes/auth/sign-in";
import { action as forgotAction } from "~/routes/auth/password-forgot";
import { action as resetAction } from "~/routes/auth/password-reset";
import { User } from "~/.server/db/models.server";
import { hashPassword } from "~/.server/passwords.server";
import { THROTTLE } from "~/.server/throttle.server";
import { call, linkToken, payloadOf, request, waitForMail } from "./helpers";

describe("sign-in lock and password reset", () => {
  test("a completed reset lifts the lock for that address", async () => {
    const email = "locked-then-reset@demo.ratebook.invalid";
    await User.create({ email, displayName: "Lock test (test)", role: "member", passwordHash: await hashPassword("old-password-1") });
    for (let i = 0; i < THROTTLE.maxFailuresPerEmail; i++) {
      await call(signInAction, request("/sign-in", { form: { email, password: `wrong-${i}-xxxxx` } }));
    }
    const locked = await call(signInAction, request("/sign-in", { form: { email, password: "old-password-1" } }));
    expect(payloadOf(locked).error).toMatch(/Too many sign-in attempts/);

    await call(forgotAction, request("/password/forgot", { form: { email } }));
    const token = linkToken((await waitForMail(email))[0].text, "/password/reset");
    const reset = await call(resetAction, request(`/password/reset/${token}`, { form: { password: "new-password-2", confirm: "new-password-2" } }), { token });
    expect(reset.status).toBe(302);

    const after = await call(signInAction, request("/sign-in", { form: { email, password: "new-password-2" } }));
    expect(after.status).toBe(302);
    expect(after.headers.get("Location")).toBe("/dashboard");
  });
});
