// Liveness of job-queue workers. A worker process killed mid-job leaves its jobs locked, and
// graphile-worker 0.17.3 frees such jobs only after its stale-lock timeout (4 hours). So every
// running worker writes a heartbeat row for the lock holders it runs, every few seconds, and
// frees the jobs of holders whose heartbeat is older than the threshold
// (graphile_worker.force_unlock_workers). In 0.17.3 a job's locked_by is the id of the worker
// pool that took it ("pool-..."), so that is the id recorded here.
// A holder that was only paused longer than the threshold loses its jobs to another worker; the
// jobs are idempotent (marking changes a version only while it is still queued).
import os from "node:os";
import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize.server";

export interface HeartbeatSettings {
  /** a holder whose heartbeat is older than this is gone */
  staleAfterMs: number;
  /** how often a live worker writes its heartbeat and looks for gone ones */
  everyMs: number;
}

/** WORKER_STALE_SECONDS (default 60) and WORKER_HEARTBEAT_SECONDS (default a sixth of it, at most 10). */
export function heartbeatSettings(env: NodeJS.ProcessEnv = process.env): HeartbeatSettings {
  const stale = Number(env.WORKER_STALE_SECONDS ?? 60);
  const staleAfterMs = Number.isFinite(stale) && stale > 0 ? stale * 1000 : 60_000;
  const every = Number(env.WORKER_HEARTBEAT_SECONDS ?? Math.min(10, staleAfterMs / 6000));
  const everyMs = Number.isFinite(every) && every > 0 ? Math.min(every * 1000, staleAfterMs / 2) : Math.min(10_000, staleAfterMs / 6);
  return { staleAfterMs, everyMs };
}

/** Records that these lock holders are alive now. */
export async function beat(holderIds: string[]): Promise<void> {
  if (!holderIds.length) return;
  await getSequelize().query(
    `insert into worker_heartbeats (worker_id, host, pid, started_at, beat_at)
       select id, $2, $3, now(), now() from unnest($1::text[]) as id
     on conflict (worker_id) do update set beat_at = now()`,
    { bind: [holderIds, os.hostname().slice(0, 255), process.pid] },
  );
}

/** Removes the rows of holders that stopped cleanly (their jobs were finished or unlocked). */
export async function forget(holderIds: string[]): Promise<void> {
  if (!holderIds.length) return;
  await getSequelize().query("delete from worker_heartbeats where worker_id = any($1::text[])", { bind: [holderIds] });
}

/**
 * Frees the jobs of every holder whose heartbeat is older than `staleAfterMs` and removes its
 * row, in one transaction (two workers looking at once free each holder once). Returns the ids.
 */
export async function freeGoneWorkers(staleAfterMs: number): Promise<string[]> {
  const sequelize = getSequelize();
  return sequelize.transaction(async (transaction) => {
    const gone = await sequelize.query<{ id: string }>(
      "delete from worker_heartbeats where beat_at < now() - make_interval(secs => $1) returning worker_id as id",
      { bind: [staleAfterMs / 1000], type: QueryTypes.SELECT, transaction },
    );
    const ids = gone.map((g) => g.id);
    if (ids.length) await sequelize.query("select graphile_worker.force_unlock_workers($1::text[])", { bind: [ids], transaction });
    return ids;
  });
}
