// Running the queue. `npm start` runs a worker inside its own process for the demo; in
// production app servers only add jobs and workers run `npm run worker` on machines of their
// own. Tests drain the queue with runJobsUntilIdle().
import { EventEmitter } from "node:events";
import { run, runOnce, type Runner, type WorkerEvents } from "graphile-worker";
import { getSequelize } from "../db/sequelize.server";
import { connectionStringOf, quietWorkerLogger } from "./connection.server";
import { beat, forget, freeGoneWorkers, heartbeatSettings } from "./heartbeat.server";
import { keepRunning, type KeptWorker } from "./supervisor.server";
import { taskList } from "./tasks.server";

export async function startWorker(options: { concurrency?: number; pollInterval?: number; workerIds?: Set<string> } = {}): Promise<Runner> {
  const events = new EventEmitter() as WorkerEvents;
  // The pool's id is what graphile-worker 0.17.3 writes into a job's locked_by (the workers'
  // own ids are not), so that is the id to unlock and to keep a heartbeat for.
  events.on("pool:create", ({ workerPool }) => options.workerIds?.add(workerPool.id));
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

/** A rejection nobody handled that comes from inside graphile-worker (its stack says so). */
export function fromQueueLibrary(reason: unknown): boolean {
  const stack = reason instanceof Error ? String(reason.stack ?? "") : "";
  return /[\\/]graphile-worker[\\/]/.test(stack);
}

/**
 * A worker that survives a database restart (see supervisor.server.ts) and the death of other
 * workers (see heartbeat.server.ts): `npm start` and `npm run worker` use this one.
 */
export async function keepWorkerRunning(options: { concurrency?: number; pollInterval?: number } = {}): Promise<KeptWorker<Runner>> {
  const { staleAfterMs, everyMs } = heartbeatSettings();
  let live = new Set<string>();
  const kept = await keepRunning({
    start: (workerIds) => {
      live = workerIds;
      return startWorker({ ...options, workerIds });
    },
    unlock: async (workerIds) => {
      await getSequelize().query("select graphile_worker.force_unlock_workers($1::text[])", { bind: [workerIds] });
      await forget(workerIds);
    },
    sleep: (ms) => new Promise((r) => setTimeout(r, ms)),
    log: (message) => console.error(message),
  });

  // Last line of defence: graphile-worker leaves some promises unawaited (the end of a job, see
  // connection.server.ts); one that still rejects must not end the process. Replace the runner
  // (its jobs are unlocked) instead. Any other unhandled rejection is thrown again, so it ends
  // the process as Node would.
  const onRejection = (reason: unknown) => {
    if (!fromQueueLibrary(reason)) throw reason;
    console.error(`[jobs] unhandled rejection inside the queue library: ${(reason as Error).message}`);
    kept.replace("the queue library lost the end of a job");
  };
  process.on("unhandledRejection", onRejection);

  let beating = false;
  let quiet = false;
  const heartbeat = async () => {
    if (beating) return;
    beating = true;
    try {
      await beat([...live]);
      const freed = await freeGoneWorkers(staleAfterMs);
      if (freed.length) console.error(`[jobs] freed the jobs of stopped workers ${freed.join(", ")} (no heartbeat for ${staleAfterMs / 1000} s)`);
      quiet = false;
    } catch (error) {
      // the database is away; the runner's own retries say so too, once is enough here
      if (!quiet) console.error(`[jobs] heartbeat failed: ${(error as Error).message}`);
      quiet = true;
    } finally {
      beating = false;
    }
  };
  await heartbeat();
  const timer = setInterval(heartbeat, everyMs);
  timer.unref();

  return {
    ...kept,
    async stop() {
      clearInterval(timer);
      await kept.stop();
      process.off("unhandledRejection", onRejection);
      await forget([...live]).catch(() => undefined);
    },
  };
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
