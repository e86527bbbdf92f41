// Reads a cookie signed by React Router's createCookie() with node:crypto instead of Web Crypto.
// The framework imports the HMAC key and verifies through crypto.subtle on every request, which
// costs two hops to the thread pool; on a signed-in API request that was the largest single
// item after the database (scripts/bench/api-me-bench.ts). Same format: the cookie value is
// base64(JSON) + "." + base64(HMAC-SHA256) with the padding stripped, URI-encoded.
import crypto from "node:crypto";

function cookieValue(header: string, name: string): string | null {
  for (const part of header.split(";")) {
    const eq = part.indexOf("=");
    if (eq < 0 || part.slice(0, eq).trim() !== name) continue;
    let raw = part.slice(eq + 1).trim();
    if (raw.startsWith('"') && raw.endsWith('"')) raw = raw.slice(1, -1);
    try {
      return decodeURIComponent(raw);
    } catch {
      return null;
    }
  }
  return null;
}

function signatureOf(value: string, secret: string): Buffer {
  return crypto.createHmac("sha256", secret).update(value).digest();
}

/**
 * The decoded value of a signed cookie, or null when it is missing, empty, or its signature does
 * not match any of the secrets (the first secret signs; older ones still verify, as in createCookie).
 */
export function readSignedCookie(cookieHeader: string | null, name: string, secrets: readonly string[]): unknown {
  if (!cookieHeader) return null;
  const signed = cookieValue(cookieHeader, name);
  if (!signed) return null;
  const dot = signed.lastIndexOf(".");
  if (dot <= 0) return null;
  const value = signed.slice(0, dot);
  const given = Buffer.from(signed.slice(dot + 1), "base64");
  const valid = secrets.some((secret) => {
    const expected = signatureOf(value, secret);
    return given.length === expected.length && crypto.timingSafeEqual(given, expected);
  });
  if (!valid) return null;
  try {
    // createCookie encodes btoa(unescape(encodeURIComponent(JSON))): base64 of the UTF-8 bytes.
    return JSON.parse(Buffer.from(value, "base64").toString("utf8"));
  } catch {
    return null;
  }
}
