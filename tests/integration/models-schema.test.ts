// The Sequelize models and the schema the migrations make must agree: every model's table exists,
// every attribute is a column of the matching type family, with the same nullability, and a
// column the database requires (NOT NULL without a default) is known to the model. And every
// migration's `down` runs: all the way down on a spare database, then up again.
import { describe, expect, test } from "vitest";
import pg from "pg";
import { DataTypes, QueryTypes, Sequelize } from "sequelize";
import { createMigrator, type Migration } from "../../db/migrator";
import { getSequelize } from "~/.server/db/sequelize.server";
import "~/.server/db/models.server";
import "~/.server/db/api-token.server";
import "~/.server/db/class-results.server";
import "~/.server/db/course-invitations.server";
import "~/.server/db/groups.server";
import "~/.server/db/lab-sessions.server";
import "~/.server/db/reaction-systems.server";
import "~/.server/db/submissions.server";
import "~/.server/db/user-session.server";
import "~/.server/db/user-identity.server";
import "~/.server/db/lti.server";

interface Column {
  table_name: string;
  column_name: string;
  data_type: string;
  is_nullable: "YES" | "NO";
  column_default: string | null;
  character_maximum_length: number | null;
}

/** The PostgreSQL data_type each Sequelize type key is stored as (Sequelize 6's postgres dialect). */
const STORED_AS: Record<string, string[]> = {
  INTEGER: ["integer"],
  BIGINT: ["bigint"],
  SMALLINT: ["smallint"],
  STRING: ["character varying"],
  CHAR: ["character"],
  TEXT: ["text"],
  CITEXT: ["USER-DEFINED"],
  BOOLEAN: ["boolean"],
  DATE: ["timestamp with time zone"],
  DATEONLY: ["date"],
  DOUBLE: ["double precision"],
  "DOUBLE PRECISION": ["double precision"],
  FLOAT: ["double precision", "real"],
  REAL: ["real"],
  DECIMAL: ["numeric"],
  JSON: ["json"],
  JSONB: ["jsonb"],
  ENUM: ["USER-DEFINED"],
  UUID: ["uuid"],
  BLOB: ["bytea"],
  ARRAY: ["ARRAY"],
};

describe("models and the migrated schema", () => {
  test("every model attribute is a column of its type, with its nullability", async () => {
    const sequelize = getSequelize();
    const columns = await sequelize.query<Column>(
      "select table_name, column_name, data_type, is_nullable, column_default, character_maximum_length from information_schema.columns where table_schema = 'public'",
      { type: QueryTypes.SELECT },
    );
    const byTable = new Map<string, Map<string, Column>>();
    for (const c of columns) {
      if (!byTable.has(c.table_name)) byTable.set(c.table_name, new Map());
      byTable.get(c.table_name)!.set(c.column_name, c);
    }
    const problems: string[] = [];
    const models = Object.values(sequelize.models);
    expect(models.length).toBeGreaterThan(10);
    for (const model of models) {
      const table = model.getTableName() as string;
      const cols = byTable.get(table);
      if (!cols) {
        problems.push(`${model.name}: table ${table} does not exist`);
        continue;
      }
      const known = new Set<string>();
      for (const [name, attr] of Object.entries(model.getAttributes())) {
        if (attr.type instanceof DataTypes.VIRTUAL) continue;
        const field = attr.field ?? name;
        known.add(field);
        const col = cols.get(field);
        if (!col) {
          problems.push(`${model.name}.${name}: no column ${table}.${field}`);
          continue;
        }
        const key = (attr.type as unknown as { key: string }).key;
        const want = STORED_AS[key];
        if (!want) problems.push(`${model.name}.${name}: type ${key} has no entry in this test`);
        else if (!want.includes(col.data_type)) problems.push(`${model.name}.${name}: model ${key}, column ${col.data_type}`);
        const length = (attr.type as unknown as { options?: { length?: number } }).options?.length;
        if (key === "STRING" && length && col.character_maximum_length !== null && col.character_maximum_length !== length) {
          problems.push(`${model.name}.${name}: model length ${length}, column ${col.character_maximum_length}`);
        }
        // An attribute that says nothing of null (timestamps the model writes itself, most foreign
        // keys) leaves it to the database's NOT NULL; a column the model calls NOT NULL must be so,
        // and one it declares nullable must accept null.
        // Keys that an association added (`references` set by Sequelize) are in the same case.
        if ((attr.allowNull === undefined || attr.references) && !attr.primaryKey && col.is_nullable === "NO") continue;
        const modelNullable = attr.primaryKey ? false : attr.allowNull !== false;
        if (modelNullable !== (col.is_nullable === "YES")) problems.push(`${model.name}.${name}: model ${modelNullable ? "allows" : "refuses"} null, column is ${col.is_nullable === "YES" ? "nullable" : "NOT NULL"}`);
      }
      for (const col of cols.values()) {
        if (!known.has(col.column_name) && col.is_nullable === "NO" && col.column_default === null) {
          problems.push(`${model.name}: column ${table}.${col.column_name} is NOT NULL without a default, and the model does not know it`);
        }
      }
    }
    expect(problems).toEqual([]);
  });
});

describe("migrations down and up again", () => {
  test("every migration reverts, leaving no table of ours, and the chain applies again", async () => {
    const spareName = "ratebook_test_migrations";
    const admin = new pg.Client({ connectionString: process.env.DATABASE_URL });
    await admin.connect();
    await admin.query(`drop database if exists ${spareName} with (force)`);
    await admin.query(`create database ${spareName}`);
    const url = new URL(process.env.DATABASE_URL!);
    url.pathname = `/${spareName}`;
    const spare = new Sequelize(url.href, { dialect: "postgres", dialectModule: pg, logging: false });
    try {
      const migrator = createMigrator(spare, { quiet: true });
      const applied = await migrator.up();
      expect(applied.length).toBeGreaterThan(5);
      const reverted = await migrator.down({ to: 0 });
      expect(reverted.map((m) => m.name)).toEqual(applied.map((m) => m.name).reverse());
      const left = await spare.query<{ table_name: string }>(
        "select table_name from information_schema.tables where table_schema = 'public' and table_name <> 'schema_migrations'",
        { type: QueryTypes.SELECT },
      );
      expect(left.map((t) => t.table_name)).toEqual([]);
      const types = await spare.query<{ typname: string }>("select t.typname from pg_type t join pg_namespace n on n.oid = t.typnamespace where n.nspname = 'public' and t.typtype = 'e'", { type: QueryTypes.SELECT });
      expect(types.map((t) => t.typname)).toEqual([]);
      expect((await migrator.up()).length).toBe(applied.length);
    } finally {
      await spare.close();
      await admin.query(`drop database if exists ${spareName} with (force)`);
      await admin.end();
    }
  }, 120_000);
});

describe("each migration in a transaction", () => {
  // Migrations made here (never shipped): one that works, one whose `up` fails after it has made
  // a table with an enum type, an index, a row and a column on the first one's table, and one
  // whose `down` fails after dropping its table.
  const spareName = "ratebook_test_migration_tx";
  const probes: Migration[] = [
    {
      name: "9001-probe-kept",
      up: async ({ context: qi }) => {
        await qi.createTable("probe_kept", { id: { type: DataTypes.INTEGER, primaryKey: true }, state: { type: DataTypes.ENUM("a", "b"), allowNull: false } });
        await qi.bulkInsert("probe_kept", [{ id: 1, state: "a" }]);
      },
      down: async ({ context: qi }) => {
        await qi.dropTable("probe_kept", {});
        await qi.sequelize.query('drop type if exists "enum_probe_kept_state"');
      },
    },
    {
      name: "9002-probe-half",
      up: async ({ context: qi }) => {
        await qi.createTable("probe_half", { id: { type: DataTypes.INTEGER, primaryKey: true }, kind: { type: DataTypes.ENUM("x", "y") } });
        await qi.addIndex("probe_half", ["kind"]);
        await qi.bulkInsert("probe_half", [{ id: 1, kind: "x" }]);
        await qi.addColumn("probe_kept", "added", { type: DataTypes.TEXT });
        await qi.bulkUpdate("probe_kept", { state: "b" }, { id: 1 });
        await qi.sequelize.query("select 1 / 0"); // fails here, half-way
      },
      down: async ({ context: qi }) => {
        await qi.dropTable("probe_half", {});
      },
    },
  ];
  const downFails: Migration = {
    name: "9003-probe-down-fails",
    up: async ({ context: qi }) => {
      await qi.createTable("probe_down", { id: { type: DataTypes.INTEGER, primaryKey: true } });
    },
    down: async ({ context: qi }) => {
      await qi.dropTable("probe_down", {});
      await qi.bulkUpdate("probe_kept", { state: "b" }, { id: 1 });
      await qi.sequelize.query("select * from no_such_table");
    },
  };

  async function withSpare(work: (spare: Sequelize) => Promise<void>) {
    const admin = new pg.Client({ connectionString: process.env.DATABASE_URL });
    await admin.connect();
    await admin.query(`drop database if exists ${spareName} with (force)`);
    await admin.query(`create database ${spareName}`);
    const url = new URL(process.env.DATABASE_URL!);
    url.pathname = `/${spareName}`;
    const spare = new Sequelize(url.href, { dialect: "postgres", dialectModule: pg, logging: false });
    try {
      await work(spare);
    } finally {
      await spare.close();
      await admin.query(`drop database if exists ${spareName} with (force)`);
      await admin.end();
    }
  }

  const tables = (s: Sequelize) =>
    s.query<{ table_name: string }>("select table_name from information_schema.tables where table_schema = 'public' order by 1", { type: QueryTypes.SELECT }).then((r) => r.map((t) => t.table_name));
  const enumTypes = (s: Sequelize) =>
    s.query<{ typname: string }>("select t.typname from pg_type t join pg_namespace n on n.oid = t.typnamespace where n.nspname = 'public' and t.typtype = 'e' order by 1", { type: QueryTypes.SELECT }).then((r) => r.map((t) => t.typname));
  const recorded = (s: Sequelize) => s.query<{ name: string }>("select name from schema_migrations order by name", { type: QueryTypes.SELECT }).then((r) => r.map((m) => m.name));
  const keptRow = (s: Sequelize) => s.query<Record<string, unknown>>("select * from probe_kept", { type: QueryTypes.SELECT });

  test("a migration that fails half-way leaves nothing behind and is not recorded; the one before it stays", async () => {
    await withSpare(async (spare) => {
      const migrator = createMigrator(spare, { quiet: true, migrations: probes });
      await expect(migrator.up()).rejects.toThrow(/9002-probe-half/);
      // PostgreSQL's own message comes through as the cause
      await migrator.up().catch((e: Error & { cause?: Error }) => expect(e.cause?.message).toMatch(/division by zero/));
      expect(await tables(spare)).toEqual(["probe_kept", "schema_migrations"]);
      expect(await enumTypes(spare)).toEqual(["enum_probe_kept_state"]);
      expect(await keptRow(spare)).toEqual([{ id: 1, state: "a" }]); // no "added" column, state not changed
      expect(await recorded(spare)).toEqual(["9001-probe-kept"]);
      expect((await migrator.pending()).map((m) => m.name)).toEqual(["9002-probe-half"]);
    });
  }, 60_000);

  test("a down that fails half-way leaves the migration applied and recorded", async () => {
    await withSpare(async (spare) => {
      const migrator = createMigrator(spare, { quiet: true, migrations: [probes[0], downFails] });
      expect((await migrator.up()).map((m) => m.name)).toEqual(["9001-probe-kept", "9003-probe-down-fails"]);
      await expect(migrator.down()).rejects.toThrow(/9003-probe-down-fails/);
      expect(await tables(spare)).toEqual(["probe_down", "probe_kept", "schema_migrations"]);
      expect(await keptRow(spare)).toEqual([{ id: 1, state: "a" }]);
      expect(await recorded(spare)).toEqual(["9001-probe-kept", "9003-probe-down-fails"]);
    });
  }, 60_000);
});
