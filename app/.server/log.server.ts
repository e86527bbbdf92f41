// Structured logs: one JSON line per event (pino). While a request is being answered, every line
// carries its request id: the production server (scripts/lib/http-server.ts) runs each request
// inside `requestContext`, which lives on globalThis so that the server script and the bundled
// app (two copies of this module) share one store.
import { AsyncLocalStorage } from "node:async_hooks";
import pino from "pino";

interface RequestStore {
  requestId: string;
  /** the socket's remote address (client-address.server.ts; request limits) */
  peerAddress?: string;
}

const KEY = Symbol.for("ratebook.request-context");
const holder = globalThis as unknown as Record<symbol, AsyncLocalStorage<RequestStore> | undefined>;
export const requestContext: AsyncLocalStorage<RequestStore> = (holder[KEY] ??= new AsyncLocalStorage<RequestStore>());

/** The id of the request being answered, when there is one. */
export function currentRequestId(): string | null {
  return requestContext.getStore()?.requestId ?? null;
}

export const logger = pino({
  level: process.env.LOG_LEVEL ?? (process.env.VITEST ? "silent" : "info"),
  base: { service: process.env.RATEBOOK_SERVICE ?? "ratebook" },
  timestamp: pino.stdTimeFunctions.isoTime,
  mixin() {
    const requestId = currentRequestId();
    return requestId ? { requestId } : {};
  },
});
