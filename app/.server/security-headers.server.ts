// Security headers. Documents get a Content-Security-Policy whose only allowed inline scripts
// are the framework's, carrying a fresh nonce per response (entry.server.tsx); every other answer
// (JSON API, redirects, downloads) gets a policy that allows nothing. The root middleware adds
// the rest to every answer the app itself makes.
import crypto from "node:crypto";

export function newNonce() {
  return crypto.randomBytes(16).toString("base64");
}

export function documentPolicy(nonce: string, dev = false) {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'`,
    "style-src 'self'",
    "img-src 'self' data:",
    "font-src 'self'",
    dev ? "connect-src 'self' ws: wss:" : "connect-src 'self'",
    "form-action 'self'",
    "base-uri 'none'",
    "object-src 'none'",
    "frame-ancestors 'none'",
  ].join("; ");
}

const NOTHING_POLICY = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";

/** Adds the headers every answer gets; a route that set its own Cache-Control keeps it. */
export function withSecurityHeaders(response: Response): Response {
  const h = response.headers;
  if (!h.has("Content-Security-Policy")) h.set("Content-Security-Policy", NOTHING_POLICY);
  h.set("X-Frame-Options", "DENY");
  h.set("X-Content-Type-Options", "nosniff");
  h.set("Referrer-Policy", "same-origin");
  h.set("Cross-Origin-Opener-Policy", "same-origin");
  // Pages and API answers are per person: never kept by the browser or a proxy.
  if (!h.has("Cache-Control")) h.set("Cache-Control", "no-store");
  return response;
}
