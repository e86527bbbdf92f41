import { config } from "./config.server";

export const UNKNOWN_ADDRESS = "unknown";

/** The client's address for throttling; only trusted from the load balancer when configured. */
export function clientAddress(request: Request): string {
  if (config.trustProxy) {
    const forwarded = request.headers.get("x-forwarded-for");
    if (forwarded) return forwarded.split(",")[0].trim().slice(0, 64);
  }
  return UNKNOWN_ADDRESS;
}
