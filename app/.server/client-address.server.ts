// The client's address, for request limits. The production server (scripts/lib/http-server.ts)
// records each request's socket address in `requestContext`. Behind a load balancer
// (TRUST_PROXY=1) the address is the one the balancer added: the right-most X-Forwarded-For
// entry (entries to its left were sent by the client and can say anything).
import { config } from "./config.server";
import { requestContext } from "./log.server";

export const UNKNOWN_ADDRESS = "unknown";

function tidy(address: string): string {
  const a = address.trim().replace(/^::ffff:(?=\d+\.\d+\.\d+\.\d+$)/, "");
  return a.slice(0, 64) || UNKNOWN_ADDRESS;
}

export function clientAddress(request: Request): string {
  if (config.trustProxy) {
    const forwarded = request.headers.get("x-forwarded-for");
    const last = forwarded?.split(",").map((s) => s.trim()).filter(Boolean).at(-1);
    if (last) return tidy(last);
  }
  const peer = requestContext.getStore()?.peerAddress;
  // No server told us (vite dev, route code called directly): every such client shares one count.
  return peer ? tidy(peer) : UNKNOWN_ADDRESS;
}
