// Adding jobs to the PostgreSQL job queue. A job is added with graphile_worker.add_job inside the
// caller's transaction, so it exists exactly when the change that asked for it was committed
// (a rollback drops it) and a request never waits for the work itself (SMTP, marking).
import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize.server";

/**
 * Payload type of every task, by task name. Each task file adds its own entry:
 *   declare module "../queue.server" { interface TaskPayloads { "my-task": MyPayload } }
 */
// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface TaskPayloads {}
export type TaskName = keyof TaskPayloads & string;

export interface EnqueueOptions {
  /** the caller's transaction: the job is committed or rolled back with it */
  transaction?: Transaction;
  /** not before this time */
  runAt?: Date;
  /** attempts before the job is given up (graphile-worker's default is 25) */
  maxAttempts?: number;
  /** a second job with the same key replaces the first while it waits */
  jobKey?: string;
  /** jobs in one named queue run one at a time, in order */
  queueName?: string;
}

export async function enqueue<T extends TaskName>(task: T, payload: TaskPayloads[T], options: EnqueueOptions = {}): Promise<string> {
  const [rows] = await getSequelize().query(
    "select id from graphile_worker.add_job(:task, cast(:payload as json), queue_name => :queueName, run_at => :runAt," +
      " max_attempts => :maxAttempts, job_key => :jobKey)",
    {
      replacements: {
        task,
        payload: JSON.stringify(payload),
        queueName: options.queueName ?? null,
        runAt: options.runAt ?? null,
        maxAttempts: options.maxAttempts ?? null,
        jobKey: options.jobKey ?? null,
      },
      transaction: options.transaction,
    },
  );
  return String((rows as Array<{ id: string | number }>)[0].id);
}
