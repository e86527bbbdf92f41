// Versioned migrations with umzug. Listed explicitly: umzug's glob loader cannot load .ts
// files on Node 20, and an explicit list keeps the order reviewable.
//
// Each migration runs in a transaction of its own, together with its line in schema_migrations:
// one that fails half-way leaves the schema as it was and is not recorded (and a `down` that
// fails leaves it applied and recorded). The migrations use the query interface without passing a
// transaction, so they get the query interface of a Sequelize whose pool holds exactly one
// connection, opened with BEGIN: every statement they send goes through that connection.
import { Umzug, type UmzugStorage } from "umzug";
import { QueryTypes, Sequelize, type Options, type QueryInterface } from "sequelize";
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
import * as m0040 from "./migrations/0040-sso-identities";
import * as m0046 from "./migrations/0046-course-time-zone";
import * as m0048 from "./migrations/0048-version-that-counts";
import * as m0049 from "./migrations/0049-submission-corrections";
import * as m0050 from "./migrations/0050-lti-launch";
import * as m0051 from "./migrations/0051-course-invitations";
import * as m0056 from "./migrations/0056-lti-grades";

const migrations: Migration[] = [
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
  { name: "0040-sso-identities", ...m0040 },
  { name: "0046-course-time-zone", ...m0046 },
  { name: "0048-version-that-counts", ...m0048 },
  { name: "0049-submission-corrections", ...m0049 },
  { name: "0050-lti-launch", ...m0050 },
  { name: "0051-course-invitations", ...m0051 },
  { name: "0056-lti-grades", ...m0056 },
];

export interface Migration {
  name: string;
  up: (params: { context: QueryInterface }) => Promise<unknown>;
  down: (params: { context: QueryInterface }) => Promise<unknown>;
  /** false for an `up` that manages transactions of its own (0004: graphile-worker's installer) */
  upInTransaction?: boolean;
}

const TABLE = "schema_migrations";

/** One connection in one transaction; every query of its query interface runs inside it. */
class MigrationTransaction {
  private constructor(
    private readonly single: Sequelize,
    private readonly pid: number,
  ) {}

  static async open(from: Sequelize): Promise<MigrationTransaction> {
    const c = from.config;
    // `idle` longer than any migration: an idle connection evicted between two statements would
    // take the open transaction with it.
    const single = new Sequelize(c.database, c.username, c.password ?? undefined, {
      ...(from as unknown as { options: Options }).options,
      hooks: {},
      logging: false,
      pool: { max: 1, min: 1, idle: 24 * 3600_000, acquire: 60_000 },
    });
    try {
      await single.query("begin");
      return new MigrationTransaction(single, await MigrationTransaction.backend(single));
    } catch (error) {
      await single.close();
      throw error;
    }
  }

  private static async backend(s: Sequelize): Promise<number> {
    const [row] = await s.query<{ pid: number }>("select pg_backend_pid() as pid", { type: QueryTypes.SELECT });
    return row.pid;
  }

  get queryInterface(): QueryInterface {
    return this.single.getQueryInterface();
  }

  async query(sql: string, bind: unknown[]) {
    await this.single.query(sql, { bind });
  }

  /** Commits, unless the connection was replaced on the way (then its first statements are lost: refuse). */
  async commit() {
    try {
      if ((await MigrationTransaction.backend(this.single)) !== this.pid) {
        throw new Error("the migration's database connection was replaced while it ran, so its transaction was lost; look at the schema before running it again");
      }
      await this.single.query("commit");
    } finally {
      await this.single.close();
    }
  }

  async rollback() {
    try {
      await this.single.query("rollback");
    } catch {
      // a broken connection rolls back by itself
    } finally {
      await this.single.close();
    }
  }
}

/**
 * schema_migrations (one `name` per applied migration, the table umzug's SequelizeStorage made).
 * umzug records a migration right after its `up` resolves: the record is written in the
 * migration's still open transaction, and that commits both.
 */
class TransactionalStorage implements UmzugStorage {
  /** the open transaction of the migration being applied or reverted, by name */
  readonly open = new Map<string, MigrationTransaction>();

  constructor(private readonly sequelize: Sequelize) {}

  private async ensureTable() {
    await this.sequelize.query(`create table if not exists ${TABLE} (name varchar(255) primary key)`);
  }

  async executed(): Promise<string[]> {
    await this.ensureTable();
    const rows = await this.sequelize.query<{ name: string }>(`select name from ${TABLE} order by name`, { type: QueryTypes.SELECT });
    return rows.map((r) => r.name);
  }

  private async finish(name: string, sql: string) {
    const tx = this.open.get(name);
    this.open.delete(name);
    if (!tx) {
      // a migration that ran outside a transaction
      await this.ensureTable();
      await this.sequelize.query(sql, { bind: [name] });
      return;
    }
    try {
      await tx.query(sql, [name]);
    } catch (error) {
      await tx.rollback();
      throw error;
    }
    await tx.commit();
  }

  logMigration({ name }: { name: string }) {
    return this.finish(name, `insert into ${TABLE} (name) values ($1)`);
  }

  unlogMigration({ name }: { name: string }) {
    return this.finish(name, `delete from ${TABLE} where name = $1`);
  }
}

export function createMigrator(sequelize: Sequelize, opts: { quiet?: boolean; migrations?: Migration[] } = {}) {
  const storage = new TransactionalStorage(sequelize);
  const inTransaction = (name: string, step: (qi: QueryInterface) => Promise<unknown>) => async () => {
    const tx = await MigrationTransaction.open(sequelize);
    try {
      await step(tx.queryInterface);
    } catch (error) {
      await tx.rollback();
      throw error;
    }
    storage.open.set(name, tx);
  };
  return new Umzug({
    migrations: (opts.migrations ?? migrations).map((m: Migration) => ({
      name: m.name,
      up: m.upInTransaction === false ? () => m.up({ context: sequelize.getQueryInterface() }) : inTransaction(m.name, (qi) => m.up({ context: qi })),
      down: inTransaction(m.name, (qi) => m.down({ context: qi })),
    })),
    context: sequelize.getQueryInterface(),
    storage,
    logger: opts.quiet ? undefined : console,
  });
}
