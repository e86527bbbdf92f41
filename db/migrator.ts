// Versioned migrations with umzug. Listed explicitly: umzug's glob loader cannot load .ts
// files on Node 20, and an explicit list keeps the order reviewable.
import { Umzug, SequelizeStorage } from "umzug";
import type { QueryInterface, Sequelize } from "sequelize";
import * as m0001 from "./migrations/0001-foundation";
import * as m0002 from "./migrations/0002-sign-in-attempts-by-time";
import * as m0003 from "./migrations/0003-planning";
import * as m0004 from "./migrations/0004-job-queue";
import * as m0010 from "./migrations/0010-user-sessions";
import * as m0011 from "./migrations/0011-account-roles-course-archive";
import * as m0015 from "./migrations/0015-submissions";
import * as m0020 from "./migrations/0020-api-tokens";
import * as m0021 from "./migrations/0021-gradebook";
import * as m0022 from "./migrations/0022-class-fit-exclusions";
import * as m0025 from "./migrations/0025-gradebook-versions";
import * as m0035 from "./migrations/0035-rate-limits";

const migrations = [
  { name: "0001-foundation", ...m0001 },
  { name: "0002-sign-in-attempts-by-time", ...m0002 },
  { name: "0003-planning", ...m0003 },
  { name: "0004-job-queue", ...m0004 },
  { name: "0010-user-sessions", ...m0010 },
  { name: "0011-account-roles-course-archive", ...m0011 },
  { name: "0015-submissions", ...m0015 },
  { name: "0020-api-tokens", ...m0020 },
  { name: "0021-gradebook", ...m0021 },
  { name: "0022-class-fit-exclusions", ...m0022 },
  { name: "0025-gradebook-versions", ...m0025 },
  { name: "0035-rate-limits", ...m0035 },
];

export function createMigrator(sequelize: Sequelize, opts: { quiet?: boolean } = {}) {
  return new Umzug({
    migrations: migrations.map((m) => ({
      name: m.name,
      up: ({ context }: { context: QueryInterface }) => m.up({ context }),
      down: ({ context }: { context: QueryInterface }) => m.down({ context }),
    })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: "schema_migrations" }),
    logger: opts.quiet ? undefined : console,
  });
}
