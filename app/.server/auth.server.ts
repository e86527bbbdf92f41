// Sign-in with remix-auth 4 (no sessions of its own) and a form strategy; the session cookie
// is ours (session.server.ts).
import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { User } from "./db/models.server";
import { verifyPassword } from "./passwords.server";
import { beginSignIn, knownAccounts, signInSucceeded, waitWords } from "./throttle.server";
import { clientAddress } from "./client-address.server";
import { courseRequiringSso } from "./sso/accounts.server";

export type SignedInUser = Pick<User, "id" | "email" | "role" | "displayName">;

/** A sign-in failure whose message is safe to show as is. */
export class SignInError extends Error {
  constructor(
    message: string,
    readonly field: "email" | "password" | "form" = "form",
  ) {
    super(message);
  }
}

/** Too many attempts: answered 429 with Retry-After. */
export class SignInThrottled extends SignInError {
  constructor(readonly retryAfterS: number) {
    super(`Too many sign-in attempts. Try again in ${waitWords(retryAfterS)}, or reset your password.`);
  }
}

export function ssoRequiredMessage(courseCode: string) {
  return `Students of ${courseCode} sign in through their institution: use "Sign in with your institution" instead of a password.`;
}

export const GENERIC_FAILURE = "That e-mail and password do not match an account.";

// The one address check, shared with the send-mail job (app/lib/email-address.ts).
export { emailProblem, normaliseEmail } from "~/lib/email-address";
import { emailProblem, normaliseEmail } from "~/lib/email-address";

export const authenticator = new Authenticator<SignedInUser>();

authenticator.use(
  new FormStrategy(async ({ form, request }) => {
    const email = normaliseEmail(form.get("email"));
    const password = String(form.get("password") ?? "");
    const badEmail = emailProblem(email);
    if (badEmail) throw new SignInError(badEmail, "email");
    if (!password) throw new SignInError("Enter your password.", "password");

    const client = clientAddress(request);
    const user = await User.findOne({ where: { email } });
    const knownDevice = user !== null && (await knownAccounts(request)).includes(user.id);
    // A point is taken before the password is checked (race-free); a right password gives it back.
    const gate = await beginSignIn(email, client, knownDevice);
    if (!gate.ok) throw new SignInThrottled(gate.retryAfterS);
    const ok = await verifyPassword(password, user?.passwordHash ?? null);
    if (ok && user) await signInSucceeded(email, client, gate.counted);
    // Unknown e-mail and wrong password get the same message, so accounts cannot be probed.
    if (!ok || !user) throw new SignInError(GENERIC_FAILURE);
    // Said only after the right password, so it tells nothing to someone guessing.
    const ssoCourse = await courseRequiringSso(user.id);
    if (ssoCourse) throw new SignInError(ssoRequiredMessage(ssoCourse));
    return { id: user.id, email: user.email, role: user.role, displayName: user.displayName };
  }),
  "form",
);
