// Makes sure a project-local PostgreSQL cluster exists, runs on loopback and holds the databases
// the app and the tests use. DATABASE_URL (a real deployment) bypasses all of it.
//
// Where the cluster lives: not inside the clone. As root, PostgreSQL runs as the `postgres`
// account, which often cannot enter the clone (root's home is 0700, so is a `mktemp -d` folder),
// and we must not loosen the permissions of the user's own folders. So the cluster sits in the
// system's state directory (root) or the user's state directory (others), in a folder named after
// the clone and a hash of its real path: two clones never share a cluster, and the data survives
// a restart (not /tmp, not /run). `RATEBOOK_PG_DIR` chooses another folder.
import { createHash } from "node:crypto";
import { execFileSync, spawnSync } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import pg from "pg";

export const projectRoot = path.resolve(import.meta.dirname, "..", "..");
export const PG_USER = "ratebook";
export const DEFAULT_PG_PORT = 54329;
const isRoot = process.getuid?.() === 0;

/** The per-project folder holding the cluster (`data/`), its socket (`run/`), log and chosen port. */
export function clusterHome(root = projectRoot, env = process.env, asRoot = isRoot): string {
  if (env.RATEBOOK_PG_DIR) return path.resolve(env.RATEBOOK_PG_DIR);
  let real = root;
  try {
    real = fs.realpathSync(root);
  } catch {
    // a folder that does not exist yet keeps its given path
  }
  const slug = path.basename(real).replace(/[^A-Za-z0-9_.-]+/g, "-").slice(0, 24) || "ratebook";
  const hash = createHash("sha256").update(real).digest("hex").slice(0, 12);
  const base = asRoot
    ? "/var/lib/ratebook/clusters"
    : path.join(env.XDG_STATE_HOME || path.join(os.homedir(), ".local", "state"), "ratebook", "clusters");
  return path.join(base, `${slug}-${hash}`);
}

const home = clusterHome();
const clusterDir = path.join(home, "data");
const socketDir = path.join(home, "run");
const logFile = path.join(home, "postgres.log");
const portFile = path.join(home, "port");
/** Where clusters were kept before they moved out of the clone. */
const legacyClusterDir = path.join(projectRoot, ".data", "pg");

export const clusterLocation = { home, dataDir: clusterDir, logFile };

/**
 * The port this project's cluster uses: RATEBOOK_PG_PORT when set, else the one this cluster was
 * last started on (a clash with another clone may have moved it), else the default.
 * Synchronous, so configuration files can build connection URLs at load time.
 */
export function clusterPort(): number {
  if (process.env.RATEBOOK_PG_PORT) return Number(process.env.RATEBOOK_PG_PORT);
  try {
    const saved = Number(fs.readFileSync(portFile, "utf8").trim());
    if (Number.isInteger(saved) && saved > 0) return saved;
  } catch {
    // no cluster yet
  }
  return DEFAULT_PG_PORT;
}

export function localDatabaseUrl(db: string, port = clusterPort()) {
  return `postgres://${PG_USER}@127.0.0.1:${port}/${db}`;
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

function chownToPostgres(target: string) {
  if (isRoot) execFileSync("chown", ["-R", "postgres:postgres", target]);
}

/** Makes the folders; as root every folder above the cluster must be enterable by `postgres`. */
function prepareHome() {
  fs.mkdirSync(home, { recursive: true, mode: 0o755 });
  if (isRoot) {
    for (let dir = home; dir !== path.dirname(dir); dir = path.dirname(dir)) {
      const probe = spawnSync("runuser", ["-u", "postgres", "--", "test", "-x", dir]);
      if (probe.status !== 0) {
        throw new Error(
          `The postgres account cannot enter ${dir}, so it cannot reach the cluster in ${home}.\n` +
            "Set RATEBOOK_PG_DIR to a folder it can reach (for example under /var/lib), or DATABASE_URL to a running server.",
        );
      }
    }
  }
}

/** What answers on a port: nothing, a PostgreSQL we can ask (with its data folder), or something else. */
async function probePort(port: number): Promise<{ kind: "free" } | { kind: "cluster"; dataDirectory: string } | { kind: "other"; detail: string }> {
  const open = await new Promise<boolean>((resolve) => {
    const socket = net.connect({ host: "127.0.0.1", port });
    socket.setTimeout(1500);
    socket.once("connect", () => {
      socket.destroy();
      resolve(true);
    });
    socket.once("timeout", () => {
      socket.destroy();
      resolve(false);
    });
    socket.once("error", () => resolve(false));
  });
  if (!open) return { kind: "free" };
  const client = new pg.Client({ connectionString: localDatabaseUrl("postgres", port), connectionTimeoutMillis: 3000 });
  try {
    await client.connect();
    const { rows } = await client.query("show data_directory");
    return { kind: "cluster", dataDirectory: String(rows[0].data_directory) };
  } catch (error) {
    return { kind: "other", detail: (error as Error).message };
  } finally {
    await client.end().catch(() => {});
  }
}

function sameDir(a: string, b: string) {
  const real = (p: string) => {
    try {
      return fs.realpathSync(p);
    } catch {
      return path.resolve(p);
    }
  };
  return real(a) === real(b);
}

function stopDataDir(bin: string, dataDir: string) {
  runPg(bin, "pg_ctl", ["stop", "-D", dataDir, "-m", "fast"], { allowFail: true });
}

/** A port for this cluster: the wanted one unless another cluster holds it (then a free one nearby). */
async function choosePort(bin: string): Promise<number> {
  const explicit = process.env.RATEBOOK_PG_PORT ? Number(process.env.RATEBOOK_PG_PORT) : null;
  const wanted = clusterPort();
  for (let port = wanted, tries = 0; tries < 40; port++, tries++) {
    const seen = await probePort(port);
    if (seen.kind === "free") {
      if (port !== wanted) console.log(`[db] using port ${port} for this project's cluster instead (saved in ${portFile})`);
      return port;
    }
    if (seen.kind === "cluster" && sameDir(seen.dataDirectory, clusterDir)) return port; // ours, already up
    if (seen.kind === "cluster" && sameDir(seen.dataDirectory, legacyClusterDir)) {
      console.log(`[db] stopping this clone's old cluster in ${legacyClusterDir} (clusters now live in ${home}); you may delete .data/pg`);
      stopDataDir(bin, seen.dataDirectory);
      if ((await probePort(port)).kind === "free") return port;
    }
    const holder =
      seen.kind === "cluster"
        ? `another PostgreSQL cluster (data directory ${seen.dataDirectory}), not this project's (${clusterDir})`
        : `a server that is not this project's cluster (${seen.detail})`;
    if (explicit !== null) {
      throw new Error(`Port ${port} (RATEBOOK_PG_PORT) is answered by ${holder}.\nChoose a free port with RATEBOOK_PG_PORT, or unset it to let Ratebook pick one.`);
    }
    console.log(`[db] port ${port} is answered by ${holder}; trying ${port + 1}`);
  }
  throw new Error(`No free port found from ${wanted} to ${wanted + 39}; set RATEBOOK_PG_PORT to a free port.`);
}

async function accepts(port: number): Promise<boolean> {
  const seen = await probePort(port);
  return seen.kind === "cluster" && sameDir(seen.dataDirectory, clusterDir);
}

/** The postgres options the cluster starts with. */
function serverOptions(port: number): string {
  // The socket folder is passed as its own -c setting, quoted, so a path with spaces survives.
  return `-p ${port} -c listen_addresses=127.0.0.1 -c unix_socket_directories='${socketDir.replace(/'/g, "''")}' -c synchronous_commit=off`;
}

/**
 * The command line of `pg_ctl stop` or `pg_ctl start` for this cluster (as root, run as
 * `postgres`), for callers that must not block while it runs (the upload benchmark's restart).
 */
export function clusterControl(action: "stop" | "start"): { cmd: string; argv: string[] } {
  const exe = path.join(serverBin(), "pg_ctl");
  const args =
    action === "stop"
      ? ["stop", "-w", "-D", clusterDir, "-m", "fast"]
      : ["start", "-w", "-t", "60", "-D", clusterDir, "-l", logFile, "-o", serverOptions(clusterPort())];
  return isRoot ? { cmd: "runuser", argv: ["-u", "postgres", "--", exe, ...args] } : { cmd: exe, argv: args };
}

/** Starts this project's cluster (creating it on first use) and returns its port. */
export async function startLocalCluster(): Promise<number> {
  const known = clusterPort();
  if (fs.existsSync(path.join(clusterDir, "postmaster.pid")) && (await accepts(known))) return known;
  const bin = serverBin();
  prepareHome();
  if (!fs.existsSync(path.join(clusterDir, "PG_VERSION"))) {
    console.log(`[db] creating this project's PostgreSQL cluster in ${clusterDir}`);
    fs.mkdirSync(clusterDir, { recursive: true, mode: 0o700 });
    chownToPostgres(clusterDir);
    runPg(bin, "initdb", ["-D", clusterDir, "-U", PG_USER, "-A", "trust", "--no-sync", "-E", "UTF8", "--locale=C"]);
  }
  const port = await choosePort(bin);
  if (await accepts(port)) {
    fs.writeFileSync(portFile, `${port}\n`);
    return port;
  }
  fs.mkdirSync(socketDir, { recursive: true });
  chownToPostgres(socketDir);
  if (!fs.existsSync(logFile)) fs.writeFileSync(logFile, "");
  chownToPostgres(logFile);
  const opts = serverOptions(port);
  console.log(`[db] starting PostgreSQL on 127.0.0.1:${port} (data in ${clusterDir})`);
  const res = runPg(bin, "pg_ctl", ["start", "-w", "-t", "60", "-D", clusterDir, "-l", logFile, "-o", opts], { allowFail: true });
  for (let i = 0; i < 60; i++) {
    if (await accepts(port)) {
      fs.writeFileSync(portFile, `${port}\n`);
      return port;
    }
    await new Promise((r) => setTimeout(r, 500));
  }
  const tail = fs.existsSync(logFile) ? fs.readFileSync(logFile, "utf8").split("\n").slice(-20).join("\n") : "";
  throw new Error(`PostgreSQL did not start on port ${port}.\n${res.stdout}${res.stderr}\nlog tail:\n${tail}`);
}

/** Stops this project's cluster; returns false when there is none. */
export function stopLocalCluster(): boolean {
  const bin = findServerBin();
  if (!bin || !fs.existsSync(path.join(clusterDir, "PG_VERSION"))) return false;
  stopDataDir(bin, clusterDir);
  return true;
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

/** Drops one of this cluster's databases (the benchmarks clean up after themselves). */
export async function dropDatabase(name: string) {
  if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`unsafe database name: ${name}`);
  await adminQuery((c) => c.query(`drop database if exists ${name} with (force)`));
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
