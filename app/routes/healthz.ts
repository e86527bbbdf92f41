// GET /healthz : the load balancer's probe (200 while the database answers, 503 when it does not).
import { health } from "~/.server/health.server";

export async function loader() {
  const result = await health();
  return Response.json(result, { status: result.ok ? 200 : 503 });
}
