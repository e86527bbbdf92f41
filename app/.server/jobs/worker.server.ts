// Running the queue. `npm start` runs a worker inside its own process for the demo; in
// production app servers only add jobs and workers run `npm run worker` on machines of their
// own. Tests drain the queue with runJobsUntilIdle().
import { EventEmitter } from "node:events";
import { run, runOnce, type Runner, type WorkerEvents } from "graphile-worker";
import { getSequelize } from "../db/sequelize.server";
import { connectionStringOf, quietWorkerLogger } from "./connection.server";
import { keepRunning, type KeptWorker } from "./supervisor.server";
import { taskList } from "./tasks.server";

export async function startWorker(options: { concurrency?: number; pollInterval?: number; workerIds?: Set<string> } = {}): Promise<Runner> {
  const events = new EventEmitter() as WorkerEvents;
  events.on("worker:create", ({ worker }) => options.workerIds?.add(worker.workerId));
  return run({
    connectionString: connectionStringOf(getSequelize()),
    taskList,
    concurrency: options.concurrency ?? 4,
    pollInterval: options.pollInterval ?? 2000,
    noHandleSignals: true,
    logger: quietWorkerLogger,
    events,
  });
}

/**
 * A worker that survives a database restart (see supervisor.server.ts): `npm start` and
 * `npm run worker` use this one.
 */
export function keepWorkerRunning(options: { concurrency?: number; pollInterval?: number } = {}): Promise<KeptWorker<Runner>> {
  return keepRunning({
    start: (workerIds) => startWorker({ ...options, workerIds }),
    unlock: async (workerIds) => {
      await getSequelize().query("select graphile_worker.force_unlock_workers($1::text[])", { bind: [workerIds] });
    },
    sleep: (ms) => new Promise((r) => setTimeout(r, ms)),
    log: (message) => console.error(message),
  });
}

/**
 * Runs every job that is due now (and jobs those add) until none is left. runOnce can return
 * while its last job is still being marked done, so wait for locks to clear and go again while
 * due jobs remain (bounded).
 */
export async function runJobsUntilIdle(): Promise<void> {
  const sequelize = getSequelize();
  const count = async (where: string) => {
    const [rows] = await sequelize.query(`select count(*)::int as n from graphile_worker.jobs where ${where}`);
    return (rows as Array<{ n: number }>)[0].n;
  };
  for (let round = 0; round < 20; round++) {
    await runOnce({ connectionString: connectionStringOf(sequelize), taskList, noHandleSignals: true, logger: quietWorkerLogger });
    for (let i = 0; i < 100 && (await count("locked_at is not null")) > 0; i++) await new Promise((r) => setTimeout(r, 20));
    if ((await count("locked_at is null and run_at <= now() and attempts < max_attempts and last_error is null")) === 0) return;
  }
}

/** Jobs waiting or failed, for tests and the admin view. */
export async function pendingJobs(): Promise<Array<{ id: string; task: string; attempts: number; lastError: string | null }>> {
  const [rows] = await getSequelize().query(
    "select id, task_identifier as task, attempts, last_error as \"lastError\" from graphile_worker.jobs order by id",
  );
  return rows as never;
}
