// Makes sure a project-local PostgreSQL cluster exists, runs on loopback and holds the databases
// the app and the tests use. DATABASE_URL (a real deployment) bypasses all of it.
import { execFileSync, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";

export const projectRoot = path.resolve(import.meta.dirname, "..", "..");
export const PG_PORT = Number(process.env.RATEBOOK_PG_PORT ?? 54329);
export const PG_USER = "ratebook";
const dataRoot = path.join(projectRoot, ".data");
const clusterDir = path.join(dataRoot, "pg");
const socketDir = path.join(dataRoot, "pg-run");
const logFile = path.join(dataRoot, "pg.log");
const isRoot = process.getuid?.() === 0;

export function localDatabaseUrl(db: string) {
  return `postgres://${PG_USER}@127.0.0.1:${PG_PORT}/${db}`;
}

function findServerBin(): string | null {
  const candidates: string[] = [];
  if (process.env.PG_BIN) candidates.push(process.env.PG_BIN);
  const base = "/usr/lib/postgresql";
  if (fs.existsSync(base)) {
    const versions = fs.readdirSync(base).filter((v) => /^\d+$/.test(v)).sort((a, b) => Number(b) - Number(a));
    for (const v of versions) candidates.push(path.join(base, v, "bin"));
  }
  return candidates.find((dir) => fs.existsSync(path.join(dir, "initdb")) && fs.existsSync(path.join(dir, "pg_ctl"))) ?? null;
}

function serverBin(): string {
  let bin = findServerBin();
  if (bin) return bin;
  if (!isRoot) {
    throw new Error(
      "PostgreSQL server binaries were not found (looked in /usr/lib/postgresql/*/bin).\n" +
        "Install Debian's package and run again:  sudo apt-get install -y postgresql\n" +
        "or point DATABASE_URL at an existing server, or PG_BIN at a folder holding initdb and pg_ctl.",
    );
  }
  console.log("[db] PostgreSQL server not found; installing Debian's package 'postgresql' ...");
  execFileSync("apt-get", ["update", "-q"], { stdio: "inherit" });
  execFileSync("apt-get", ["install", "-y", "-q", "postgresql"], {
    stdio: "inherit",
    env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
  });
  bin = findServerBin();
  if (!bin) throw new Error("apt-get installed postgresql, but initdb/pg_ctl are still not in /usr/lib/postgresql/*/bin");
  return bin;
}

/** Runs a PostgreSQL server program; as root it runs as the `postgres` user, which PostgreSQL requires. */
function runPg(bin: string, program: string, args: string[], opts: { allowFail?: boolean } = {}) {
  const exe = path.join(bin, program);
  const [cmd, argv] = isRoot ? ["runuser", ["-u", "postgres", "--", exe, ...args]] : [exe, args];
  const res = spawnSync(cmd, argv, { encoding: "utf8" });
  if (res.status !== 0 && !opts.allowFail) {
    throw new Error(`${program} failed (exit ${res.status}):\n${res.stdout}\n${res.stderr}`);
  }
  return res;
}

function chownToPostgres(dir: string) {
  if (isRoot) execFileSync("chown", ["-R", "postgres:postgres", dir]);
}

async function canConnect(): Promise<boolean> {
  const client = new pg.Client({ connectionString: localDatabaseUrl("postgres"), connectionTimeoutMillis: 2000 });
  try {
    await client.connect();
    await client.query("select 1");
    return true;
  } catch {
    return false;
  } finally {
    await client.end().catch(() => {});
  }
}

export async function startLocalCluster(): Promise<void> {
  if (await canConnect()) return;
  const bin = serverBin();
  fs.mkdirSync(socketDir, { recursive: true });
  if (!fs.existsSync(path.join(clusterDir, "PG_VERSION"))) {
    console.log(`[db] creating a PostgreSQL cluster in ${path.relative(projectRoot, clusterDir)}/`);
    fs.mkdirSync(clusterDir, { recursive: true });
    chownToPostgres(clusterDir);
    runPg(bin, "initdb", ["-D", clusterDir, "-U", PG_USER, "-A", "trust", "--no-sync", "-E", "UTF8", "--locale=C"]);
  }
  chownToPostgres(socketDir);
  if (!fs.existsSync(logFile)) fs.writeFileSync(logFile, "");
  chownToPostgres(logFile);
  const opts = `-p ${PG_PORT} -k ${socketDir} -c listen_addresses=127.0.0.1 -c synchronous_commit=off`;
  console.log(`[db] starting PostgreSQL on 127.0.0.1:${PG_PORT}`);
  const res = runPg(bin, "pg_ctl", ["start", "-w", "-t", "60", "-D", clusterDir, "-l", logFile, "-o", opts], { allowFail: true });
  for (let i = 0; i < 60; i++) {
    if (await canConnect()) return;
    await new Promise((r) => setTimeout(r, 500));
  }
  const tail = fs.existsSync(logFile) ? fs.readFileSync(logFile, "utf8").split("\n").slice(-20).join("\n") : "";
  throw new Error(`PostgreSQL did not start on port ${PG_PORT}.\n${res.stdout}${res.stderr}\nlog tail:\n${tail}`);
}

export function stopLocalCluster() {
  const bin = findServerBin();
  if (!bin || !fs.existsSync(path.join(clusterDir, "PG_VERSION"))) return;
  runPg(bin, "pg_ctl", ["stop", "-D", clusterDir, "-m", "fast"], { allowFail: true });
}

async function adminQuery<T>(fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: localDatabaseUrl("postgres") });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

export async function ensureDatabase(name: string, opts: { reset?: boolean } = {}) {
  if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`unsafe database name: ${name}`);
  await adminQuery(async (c) => {
    if (opts.reset) await c.query(`drop database if exists ${name} with (force)`);
    const { rowCount } = await c.query("select 1 from pg_database where datname = $1", [name]);
    if (!rowCount) await c.query(`create database ${name}`);
  });
}

/**
 * Returns the connection URL the app should use: DATABASE_URL when set (nothing is started),
 * else the local cluster, started if needed, with `db` created (and emptied first when reset).
 */
export async function ensurePostgres(db: string, opts: { reset?: boolean } = {}): Promise<string> {
  if (process.env.DATABASE_URL) return process.env.DATABASE_URL;
  await startLocalCluster();
  await ensureDatabase(db, opts);
  return localDatabaseUrl(db);
}
