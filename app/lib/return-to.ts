// The one parser for "where to go after signing in" (?returnTo= and the sign-in form's hidden
// field). Only a path inside this app comes out, re-serialised by the URL parser, so what goes
// into a Location header is plain ASCII that every browser reads the same way.
const BASE = "http://ratebook.invalid";
const MAX_LENGTH = 2048;

export const DEFAULT_RETURN_TO = "/dashboard";

/**
 * A same-app path (path, query and fragment) from untrusted text, or `fallback`.
 * Refused: anything that is not a string starting with one "/", control characters and
 * whitespace of any kind (browsers drop tabs and line breaks from URLs, so "/\t/evil" becomes
 * "//evil"), backslashes (read as "/"), and anything that resolves to another origin or to a
 * protocol-relative path after the URL parser has normalised it ("/.//evil" -> "//evil").
 */
export function safeReturnTo(raw: unknown, fallback = DEFAULT_RETURN_TO): string {
  if (typeof raw !== "string" || raw.length === 0 || raw.length > MAX_LENGTH) return fallback;
  if (raw[0] !== "/" || raw[1] === "/" || raw.includes("\\")) return fallback;
  // C0 and C1 controls, DEL, every Unicode space, zero-width and direction marks.
  if (/[\u0000-\u0020\u007f-\u00a0\u1680\u180e\u2000-\u200f\u2028-\u202f\u205f-\u206f\u3000\ufeff]/u.test(raw)) return fallback;
  let url: URL;
  try {
    url = new URL(raw, BASE);
  } catch {
    return fallback;
  }
  if (url.origin !== BASE) return fallback;
  const path = url.pathname + url.search + url.hash;
  if (!path.startsWith("/") || path.startsWith("//") || /[^\x21-\x7e]/.test(path)) return fallback;
  return path;
}
