// The job queue lives in PostgreSQL (graphile-worker's own schema, "graphile_worker"). Its
// schema is versioned by graphile-worker itself; running its migrations here means every
// database that `npm run db:migrate` or the test setup prepares can take jobs at once, before
// any worker has started. Running them again later (a worker starting) is a no-op.
import { runMigrations } from "graphile-worker";
import type { QueryInterface } from "sequelize";
import { connectionStringOf, quietWorkerLogger } from "../../app/.server/jobs/connection.server";

// graphile-worker applies each of its own migrations in a transaction of its own and records it in
// graphile_worker.migrations (and tells a missing schema by a failed query), so this `up` cannot
// run inside the migrator's transaction; one that stops half-way is continued by the next run.
export const upInTransaction = false;

export async function up({ context: qi }: { context: QueryInterface }) {
  await runMigrations({ connectionString: connectionStringOf(qi.sequelize), logger: quietWorkerLogger });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("drop schema if exists graphile_worker cascade");
}
