// Request limits shared by every app server (app/.server/throttle.server.ts): rate-limiter-flexible's
// PostgreSQL store, in the table it would make itself (made here, so no app server creates
// tables at run time). `expire` is milliseconds since 1970, as the library writes it.
import type { QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(
    "create table rate_limits (key varchar(255) primary key, points integer not null default 0, expire bigint); create index rate_limits_expire on rate_limits (expire)",
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("drop table if exists rate_limits");
}
