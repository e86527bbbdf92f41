// The one e-mail address check: the forms (sign-in, invitation, roster, password reset) and the
// send-mail job use this function, so an address a form accepts is one the job will send to.
// The rules are the RFC 5321 "dot-atom" local part and a DNS host name (from memory of the
// RFCs; common practice for web forms, no source): no quoted local parts, no IP literals, no
// non-ASCII (those need SMTPUTF8, which a receiving server may not offer).

export function normaliseEmail(raw: unknown): string {
  return String(raw ?? "").trim().toLowerCase();
}

const LOCAL = /^[a-z0-9!#$%&'*+/=?^_`{|}~-]+(\.[a-z0-9!#$%&'*+/=?^_`{|}~-]+)*$/i;
const LABEL = /^[a-z0-9]([a-z0-9-]{0,61}[a-z0-9])?$/i;
const TOP = /^([a-z]{2,63}|xn--[a-z0-9-]{1,59})$/i;

export const NOT_AN_ADDRESS = "That does not look like an e-mail address.";

/** The message for an e-mail field, or null when it will do; `whose` names the owner ("your"). */
export function emailProblem(email: string, whose = "your"): string | null {
  if (!email) return `Enter ${whose} e-mail address.`;
  if (email.length > 254) return "An e-mail address has at most 254 characters.";
  if (/[^\x21-\x7e]/.test(email)) {
    return /\s/.test(email)
      ? "An e-mail address has no spaces or line breaks."
      : "Use the address in plain characters (letters a-z, digits and . _ + -): accented letters and other scripts cannot be sent to.";
  }
  const at = email.lastIndexOf("@");
  if (at <= 0 || email.indexOf("@") !== at) return NOT_AN_ADDRESS;
  const local = email.slice(0, at);
  const labels = email.slice(at + 1).split(".");
  if (local.length > 64 || !LOCAL.test(local)) return NOT_AN_ADDRESS;
  if (labels.length < 2 || !labels.every((l) => LABEL.test(l)) || !TOP.test(labels[labels.length - 1])) return NOT_AN_ADDRESS;
  return null;
}
