// `npm run worker` : a job-queue worker on its own (production: run it on worker machines with
// the same DATABASE_URL, SMTP_URL, MAIL_FROM and APP_URL as the app servers). Stops cleanly on
// SIGINT/SIGTERM, finishing the jobs it holds; a database restart does not stop it.
import { productionConfigProblems } from "../app/.server/config.server";
import { keepWorkerRunning } from "../app/.server/jobs/worker.server";

const problems = productionConfigProblems(process.env, "worker");
if (problems.length) {
  console.error(`The Ratebook worker refuses to start in production:\n- ${problems.join("\n- ")}`);
  process.exit(1);
}
const concurrency = Number(process.env.WORKER_CONCURRENCY ?? 4);
const runner = await keepWorkerRunning({ concurrency });
console.log(`[jobs] worker running (concurrency ${concurrency}); Ctrl+C stops it`);
for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, async () => {
    await runner.stop();
    const { closeSequelize } = await import("../app/.server/db/sequelize.server");
    await closeSequelize();
    process.exit(0);
  });
}
await runner.promise;
