// Writes to the JSON API made with the session cookie must come from our own pages: React Router
// refuses cross-origin posts to page actions, but not to resource routes. A Bearer token is not
// sent by browsers on their own, so token requests need no such check.
import { config } from "./config.server";
import type { Principal } from "./guards.server";

/** Throws 403 JSON when a cookie-authenticated write carries an Origin that is not ours. */
export function requireSameOriginWrite(request: Request, principal: Principal | null) {
  if (!principal || principal.via !== "session") return;
  if (request.method === "GET" || request.method === "HEAD") return;
  const origin = request.headers.get("origin");
  if (origin === null) return; // browsers send Origin on every cross-origin write
  const ours = new Set([new URL(request.url).origin, new URL(config.appUrl).origin]);
  if (!ours.has(origin)) {
    throw Response.json({ error: `A write from ${origin} is refused: use Ratebook's own pages, or an API token.` }, { status: 403 });
  }
}

/** For writes that need no sign-in (sign-out): a browser's Origin must be ours, cookie or not. */
export function requireSameOriginPost(request: Request) {
  const origin = request.headers.get("origin");
  if (origin === null) return;
  const ours = new Set([new URL(request.url).origin, new URL(config.appUrl).origin]);
  if (!ours.has(origin)) throw Response.json({ error: `A write from ${origin} is refused: use Ratebook's own pages.` }, { status: 403 });
}
