// `npm run serve` : the production server (scripts/lib/http-server.ts) on the production build.
// Refuses to start in production without a long SESSION_SECRET and an APP_URL. PORT (3000) and
// HOST (all addresses) say where it listens; TRUST_PROXY=1 behind a load balancer.
import "./lib/production-mode";
import path from "node:path";
import { pathToFileURL } from "node:url";
import type { ServerBuild } from "react-router";
import { productionConfigProblems } from "../app/.server/config.server";
import { logger } from "../app/.server/log.server";
import { createHttpServer } from "./lib/http-server";
import { projectRoot } from "./lib/postgres";

const problems = productionConfigProblems();
if (problems.length) {
  console.error(`Ratebook refuses to start in production:\n- ${problems.join("\n- ")}`);
  process.exit(1);
}

const buildFile = path.resolve(projectRoot, process.argv[2] ?? "build/server/index.js");
const build = (await import(pathToFileURL(buildFile).href)) as ServerBuild;
const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST || undefined;
const server = createHttpServer({
  build,
  clientDir: path.join(path.dirname(buildFile), "..", "client"),
  publicUrl: process.env.APP_URL ?? null,
  trustProxy: process.env.TRUST_PROXY === "1",
});
server.listen(port, host, () => {
  logger.info({ port, host: host ?? "all", appUrl: process.env.APP_URL ?? null }, `listening on http://${host ?? "localhost"}:${port}`);
});
let stopping = false;
for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    if (stopping) return;
    stopping = true;
    // finish answers in flight, then go (a load balancer has stopped sending by then)
    server.close(() => process.exit(0));
    server.closeIdleConnections();
    setTimeout(() => process.exit(0), 10_000).unref();
  });
}
