// Failing safe in deployment: the health probe's shape and counts, and the demo seed refusing a
// production environment and a database that holds people who are not demo people.
import { spawnSync } from "node:child_process";
import path from "node:path";
import pg from "pg";
import { afterAll, describe, expect, test } from "vitest";
import { loader as healthz } from "~/routes/healthz";
import { getSequelize } from "~/.server/db/sequelize.server";
import { User } from "~/.server/db/models.server";

const root = path.resolve(import.meta.dirname, "..", "..");
const SPARE_DB = "ratebook_test_seed_guard";

afterAll(async () => {
  await User.destroy({ where: { email: "real.person@example.org" } });
  await admin((c) => c.query(`drop database if exists ${SPARE_DB} with (force)`));
});

async function admin<T>(work: (c: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    return await work(client);
  } finally {
    await client.end();
  }
}

function seed(env: Record<string, string>) {
  return spawnSync(path.join(root, "node_modules", ".bin", "tsx"), ["scripts/db-seed.ts"], { cwd: root, encoding: "utf8", timeout: 120_000, env: { ...process.env, ...env } });
}

describe("GET /healthz", () => {
  test("200 with the database up; waiting and failed jobs counted", async () => {
    const before = (await (await healthz()).json()) as { ok: boolean; database: string; queue: { waiting: number; failed: number } };
    expect(before).toMatchObject({ ok: true, database: "up" });
    const sequelize = getSequelize();
    await sequelize.query("select graphile_worker.add_job('health-probe-test', '{}'::json, run_at => now() + interval '1 day', job_key => 'health-waiting')");
    await sequelize.query("select graphile_worker.add_job('health-probe-test', '{}'::json, run_at => now() + interval '1 day', max_attempts => 1, job_key => 'health-failed')");
    await sequelize.query("update graphile_worker._private_jobs set attempts = 1, last_error = 'test' where key = 'health-failed'");
    try {
      const res = await healthz();
      expect(res.status).toBe(200);
      const after = (await res.json()) as typeof before;
      expect(after.queue.waiting).toBe(before.queue.waiting + 1);
      expect(after.queue.failed).toBe(before.queue.failed + 1);
    } finally {
      await sequelize.query("select graphile_worker.remove_job('health-waiting'); select graphile_worker.remove_job('health-failed')").catch(() => undefined);
      await sequelize.query("delete from graphile_worker._private_jobs where key in ('health-waiting', 'health-failed')");
    }
  });
});

describe("npm run db:seed", () => {
  test("refuses in production, and adds nothing", async () => {
    const count = async () => User.count();
    const n = await count();
    const res = seed({ NODE_ENV: "production" });
    expect(res.status).toBe(1);
    expect(res.stderr).toMatch(/refused: NODE_ENV is production/);
    expect(await count()).toBe(n);
  });

  test("refuses a database holding people who are not demo people; a demo-only database takes it (twice)", async () => {
    await User.findOrCreate({ where: { email: "real.person@example.org" }, defaults: { email: "real.person@example.org", displayName: "Invented real person", role: "member", passwordHash: null } as never });
    const refused = seed({});
    expect(refused.status).toBe(1);
    expect(refused.stderr).toMatch(/holds \d+ (person|people) who (is|are) not demo people/);

    await admin((c) => c.query(`drop database if exists ${SPARE_DB} with (force)`).then(() => c.query(`create database ${SPARE_DB}`)));
    const spare = new URL(process.env.DATABASE_URL!);
    spare.pathname = `/${SPARE_DB}`;
    const first = seed({ DATABASE_URL: spare.href });
    expect(first.status, first.stderr).toBe(0);
    const again = seed({ DATABASE_URL: spare.href });
    expect(again.status, again.stderr).toBe(0);
    expect(again.stdout).toMatch(/demo data ready/);
  }, 240_000);
});
