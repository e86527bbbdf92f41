// The Sequelize models and the schema the migrations make must agree: every model's table exists,
// every attribute is a column of the matching type family, with the same nullability, and a
// column the database requires (NOT NULL without a default) is known to the model. And every
// migration's `down` runs: all the way down on a spare database, then up again.
import { describe, expect, test } from "vitest";
import pg from "pg";
import { DataTypes, QueryTypes, Sequelize } from "sequelize";
import { createMigrator } from "../../db/migrator";
import { getSequelize } from "~/.server/db/sequelize.server";
import "~/.server/db/models.server";
import "~/.server/db/api-token.server";
import "~/.server/db/class-results.server";
import "~/.server/db/groups.server";
import "~/.server/db/lab-sessions.server";
import "~/.server/db/reaction-systems.server";
import "~/.server/db/submissions.server";
import "~/.server/db/user-session.server";

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
