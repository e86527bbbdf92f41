// Shared by the HTTP benchmarks: a throwaway bench database, the production server started on a
// loopback port, a sign-in, and a bounded autocannon run whose latencies go into an HDR
// histogram (autocannon's own result has no p99 of every response, only of per-second samples).
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { stopChild } from "../../lib/child-process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import autocannon from "autocannon";
import * as hdr from "hdr-histogram-js";
import { ensurePostgres, projectRoot } from "../../lib/postgres";

export const BENCH_PORT = Number(process.env.BENCH_APP_PORT ?? 3190);
export const BENCH_BARE_PORT = Number(process.env.BENCH_BARE_PORT ?? BENCH_PORT + 1);
export const BENCH_BASE = `http://127.0.0.1:${BENCH_PORT}`;

/** The bench database (emptied first), migrated and holding the demo data; sets DATABASE_URL. */
export async function openBenchDatabase(name = "ratebook_bench") {
  delete process.env.DATABASE_URL;
  process.env.DATABASE_URL = await ensurePostgres(name, { reset: true });
  process.env.SESSION_SECRET ??= "bench-only-session-secret-of-32-characters-or-more";
  process.env.BCRYPT_COST ??= "4";
  const { getSequelize, closeSequelize } = await import("../../../app/.server/db/sequelize.server");
  const { createMigrator } = await import("../../../db/migrator");
  await createMigrator(getSequelize(), { quiet: true }).up();
  const { seedDemo } = await import("../../../db/seeds/demo");
  await seedDemo();
  return { url: process.env.DATABASE_URL, close: closeSequelize };
}

/** Builds the app unless BENCH_SKIP_BUILD=1 and a build is there. */
export function ensureBuild() {
  const built = fs.existsSync(path.join(projectRoot, "build", "server", "index.js"));
  if (built && process.env.BENCH_SKIP_BUILD === "1") return;
  console.log("[bench] react-router build ...");
  const res = spawnSync(path.join(projectRoot, "node_modules", ".bin", "react-router"), ["build"], { cwd: projectRoot, stdio: ["ignore", "ignore", "inherit"] });
  if (res.status !== 0) throw new Error("react-router build failed");
}

/** A static file the server answers (the ceiling): the largest JS asset of the build. */
export function staticAssetPath(): string {
  const dir = path.join(projectRoot, "build", "client", "assets");
  const js = fs.readdirSync(dir).filter((f) => f.endsWith(".js"));
  js.sort((a, b) => fs.statSync(path.join(dir, a)).size - fs.statSync(path.join(dir, b)).size);
  return `/assets/${js[Math.floor(js.length / 2)]}`;
}

async function waitForPort(url: string, child: ChildProcess, what: string) {
  for (let i = 0; i < 200; i++) {
    if (child.exitCode !== null) throw new Error(`${what} exited with ${child.exitCode} before answering`);
    try {
      await fetch(url);
      return;
    } catch {
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  throw new Error(`${what} did not answer at ${url}`);
}

/** Starts the production server exactly as `npm run serve` does, on the bench port. */
export async function startAppServer(extraEnv: Record<string, string> = {}, argv = [path.join(projectRoot, "node_modules", "tsx", "dist", "cli.mjs"), "scripts/serve.ts"]) {
  const child = spawn(process.execPath, argv, {
    cwd: projectRoot,
    env: { ...process.env, PORT: String(BENCH_PORT), HOST: "127.0.0.1", SESSION_COOKIE_SECURE: "0", NODE_ENV: "production", APP_URL: BENCH_BASE, LOG_LEVEL: "warn", ...extraEnv },
    stdio: ["ignore", "ignore", "inherit"],
  });
  await waitForPort(`${BENCH_BASE}/sign-in`, child, "the app server");
  return { child, stop: () => stopChild(child, 3000) };
}

/** A bare node:http server answering every request with the same 20 kB JSON body. */
export async function startBareServer() {
  const code = `
    const body = JSON.stringify({ rows: Array.from({ length: 200 }, (_, i) => ({ id: i, name: "row " + i, value: i * 1.5, flag: i % 2 === 0, note: "x".repeat(40) })) });
    require("node:http").createServer((req, res) => { res.writeHead(200, { "content-type": "application/json" }); res.end(body); })
      .listen(${BENCH_BARE_PORT}, "127.0.0.1");`;
  const child = spawn(process.execPath, ["-e", code], { stdio: ["ignore", "ignore", "inherit"] });
  await waitForPort(`http://127.0.0.1:${BENCH_BARE_PORT}/`, child, "the bare server");
  return { child, url: `http://127.0.0.1:${BENCH_BARE_PORT}/`, stop: () => stopChild(child, 3000) };
}

/** Signs a demo account in through the real form and returns its session cookie. */
export async function signIn(email: string, password: string): Promise<string> {
  const res = await fetch(`${BENCH_BASE}/sign-in`, {
    method: "POST",
    body: new URLSearchParams({ email, password }),
    redirect: "manual",
  });
  const cookie = (res.headers.get("set-cookie") ?? "").split(";")[0];
  if (res.status !== 302 || !cookie) throw new Error(`sign-in as ${email} gave ${res.status}`);
  return cookie;
}

export interface LoadFigures {
  label: string;
  requests: number;
  rps: number;
  p50: number;
  p97_5: number;
  p99: number;
  max: number;
  non2xx: number;
  errors: number;
  bytesPerResponse: number;
  /** CPU time the server process spent per request (user + system), ms; NaN when unknown */
  serverCpuMs: number;
}

/** CPU seconds (user + system) a process has used so far, from /proc (Linux); NaN elsewhere. */
export function processCpuSeconds(pid: number | undefined): number {
  try {
    const fields = fs.readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
    return (Number(fields[11]) + Number(fields[12])) / 100; // utime, stime in clock ticks (USER_HZ = 100)
  } catch {
    return NaN;
  }
}

/** One bounded load run: `connections` clients for `seconds` against one URL. */
export async function load(
  label: string,
  url: string,
  opts: { connections?: number; seconds?: number; headers?: Record<string, string>; serverPid?: number } = {},
): Promise<LoadFigures> {
  const histogram = hdr.build({ lowestDiscernibleValue: 1, highestTrackableValue: 60_000_000, numberOfSignificantValueDigits: 3 });
  let bytes = 0;
  let responses = 0;
  const cpu0 = processCpuSeconds(opts.serverPid);
  let finish: (r: autocannon.Result) => void = () => {};
  let fail: (e: unknown) => void = () => {};
  const done = new Promise<autocannon.Result>((resolve, reject) => {
    finish = resolve;
    fail = reject;
  });
  const instance = autocannon({ url, connections: opts.connections ?? 20, duration: opts.seconds ?? 20, headers: opts.headers }, (error, result) =>
    error ? fail(error) : finish(result),
  );
  instance.on("response", (_client, _status, resBytes, responseTimeMs) => {
    histogram.recordValue(Math.max(1, Math.round(responseTimeMs * 1000)));
    bytes += resBytes;
    responses++;
  });
  const result = await done;
  const cpu = processCpuSeconds(opts.serverPid) - cpu0;
  const ms = (p: number) => histogram.getValueAtPercentile(p) / 1000;
  const figures: LoadFigures = {
    label,
    requests: result.requests.total,
    rps: result.requests.total / (result.duration || opts.seconds || 20),
    p50: ms(50),
    p97_5: ms(97.5),
    p99: ms(99),
    max: histogram.maxValue / 1000,
    non2xx: result.non2xx,
    errors: result.errors + result.timeouts,
    bytesPerResponse: responses ? bytes / responses : 0,
    serverCpuMs: (cpu * 1000) / result.requests.total,
  };
  histogram.destroy();
  return figures;
}

export function printLoadTable(rows: LoadFigures[]) {
  const head = ["", "req/s", "p50 ms", "p97.5 ms", "p99 ms", "max ms", "server CPU ms/req", "bytes", "non-2xx", "errors"];
  const body = rows.map((r) => [
    r.label,
    r.rps.toFixed(0),
    r.p50.toFixed(1),
    r.p97_5.toFixed(1),
    r.p99.toFixed(1),
    r.max.toFixed(1),
    Number.isFinite(r.serverCpuMs) ? r.serverCpuMs.toFixed(2) : "n/a",
    r.bytesPerResponse.toFixed(0),
    String(r.non2xx),
    String(r.errors),
  ]);
  const widths = head.map((h, i) => Math.max(h.length, ...body.map((b) => b[i].length)));
  const line = (cells: string[]) => cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join("  ");
  console.log(line(head));
  for (const b of body) console.log(line(b));
}

/** The machine's load right now, printed with the figures: other work on the same cores skews them. */
export function machineNote() {
  return `${os.cpus().length} cores, load average ${os.loadavg().map((l) => l.toFixed(2)).join(" / ")}`;
}
