// The operator's view of the queue (admin page /admin/jobs): jobs waiting (attempts left, due or
// not, or held by a worker) and failed (no attempts left), and a retry that gives a failed job
// its attempts again and makes it due now. The retry is audited.
import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import { recordAudit } from "../audit.server";

export interface QueueJob {
  id: string;
  task: string;
  attempts: number;
  maxAttempts: number;
  runAt: string;
  lockedAt: string | null;
  lastError: string | null;
  state: "waiting" | "running" | "failed";
}

const LIST_LIMIT = 200;

export async function queueJobs(): Promise<{ waiting: QueueJob[]; failed: QueueJob[] }> {
  const rows = await getSequelize().query<{ id: string; task: string; attempts: number; maxAttempts: number; runAt: Date; lockedAt: Date | null; lastError: string | null }>(
    `select id::text as id, task_identifier as task, attempts, max_attempts as "maxAttempts", run_at as "runAt",
            locked_at as "lockedAt", last_error as "lastError"
       from graphile_worker.jobs order by run_at, id limit ${LIST_LIMIT * 2}`,
    { type: QueryTypes.SELECT },
  );
  const jobs: QueueJob[] = rows.map((r) => ({
    id: r.id,
    task: r.task,
    attempts: r.attempts,
    maxAttempts: r.maxAttempts,
    runAt: new Date(r.runAt).toISOString(),
    lockedAt: r.lockedAt ? new Date(r.lockedAt).toISOString() : null,
    // the first line says what went wrong; the stack is in the worker's log
    lastError: r.lastError ? r.lastError.split("\n")[0].slice(0, 300) : null,
    state: r.attempts >= r.maxAttempts ? "failed" : r.lockedAt ? "running" : "waiting",
  }));
  return { waiting: jobs.filter((j) => j.state !== "failed").slice(0, LIST_LIMIT), failed: jobs.filter((j) => j.state === "failed").slice(0, LIST_LIMIT) };
}

/** Gives a failed job its attempts back, due now. False when there is no such failed job. */
export async function retryFailedJob(jobId: number, actorId: number): Promise<boolean> {
  return getSequelize().transaction(async (transaction) => {
    const found = await getSequelize().query<{ task: string; attempts: number }>(
      // the private tables: the public view cannot be locked row by row
      `select t.identifier as task, j.attempts from graphile_worker._private_jobs j join graphile_worker._private_tasks t on t.id = j.task_id
        where j.id = $1 and j.attempts >= j.max_attempts and j.locked_at is null for update of j`,
      { bind: [jobId], type: QueryTypes.SELECT, transaction },
    );
    if (!found.length) return false;
    await getSequelize().query("select 1 from graphile_worker.reschedule_jobs(array[$1::bigint], run_at => now(), attempts => 0)", { bind: [jobId], transaction });
    await recordAudit({ actorId, action: "job.retried", entityType: "job", entityId: jobId, before: { task: found[0].task, attempts: found[0].attempts }, after: { attempts: 0 } }, transaction);
    return true;
  });
}
