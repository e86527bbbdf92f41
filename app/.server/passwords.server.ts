import bcrypt from "bcryptjs";

const COST = Number(process.env.BCRYPT_COST ?? 11);
export const MIN_PASSWORD_LENGTH = 10;

export function hashPassword(plain: string) {
  return bcrypt.hash(plain, COST);
}

// A hash to compare against when the e-mail is unknown, so both paths take the same time.
const decoy = bcrypt.hashSync("decoy-password-never-used", COST);

export function verifyPassword(plain: string, hash: string | null) {
  return bcrypt.compare(plain, hash ?? decoy).then((ok) => ok && hash !== null);
}

/** Returns a message when the new password is unacceptable, else null. */
export function checkNewPassword(password: string, confirm: string): string | null {
  if (password.length < MIN_PASSWORD_LENGTH) return `Use at least ${MIN_PASSWORD_LENGTH} characters.`;
  if (password.length > 200) return "Use at most 200 characters.";
  if (password !== confirm) return "The two passwords differ.";
  return null;
}
