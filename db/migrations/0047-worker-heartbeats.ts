// One row per live job-queue lock holder (a worker pool), refreshed every few seconds by the
// worker that runs it; other workers free the jobs of a holder whose row has gone stale
// (app/.server/jobs/heartbeat.server.ts).
import type { QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(
    `create table worker_heartbeats (
       worker_id text primary key,
       host varchar(255) not null,
       pid integer not null,
       started_at timestamptz not null default now(),
       beat_at timestamptz not null default now()
     );
     create index worker_heartbeats_beat_at on worker_heartbeats (beat_at)`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("drop table if exists worker_heartbeats");
}
