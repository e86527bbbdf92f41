// Upload-and-marking benchmark and PostgreSQL-restart fault test. Against the production server
// and a job worker it starts itself on loopback, with a fresh database of its own:
//   1. seeds a practical of 200 groups (one student and one bench each, own feed and temperature)
//      and a personal API token per student; each group's readings are a 5,000-row CSV made from
//      the engine's closed forms at its bench's feed and reference k, with seeded noise;
//   2. burst: every group uploads once (arrivals spread over BENCH_BURST_SECONDS, at most
//      BENCH_IN_FLIGHT uploads in flight) and polls GET /api/submissions/:id until marked; prints
//      stored, marked, duplicates, upload->mark latency (target p95 < 1 s) and uploads/s;
//   3. fault: the same burst (each group's version 2) with the PostgreSQL server stopped halfway
//      and started again after BENCH_OUTAGE_SECONDS; uploads during the outage must be answered
//      quickly with a 503 and a JSON message; the client retries with backoff until accepted;
//      then no half-stored submission may exist and every group has exactly one marked version 2.
// Exits 1 when a target is missed. Only 127.0.0.1 is contacted; server, worker and database are
// removed at the end.
// Usage: npm run bench:uploads  (BENCH_APP_PORT=3190, BENCH_GROUPS=200, BENCH_ROWS=5000,
//        BENCH_IN_FLIGHT=20, BENCH_BURST_SECONDS=30, BENCH_OUTAGE_SECONDS=3, WORKER_CONCURRENCY=4)
import { spawn, type ChildProcess } from "node:child_process";
import { stopChild } from "../lib/child-process";
import path from "node:path";
import pg from "pg";
import { BENCH_BASE, ensureBuild, machineNote, openBenchDatabase, startAppServer } from "./lib/http-load";
import { clusterControl, dropDatabase, projectRoot } from "../lib/postgres";
import { readingsFor as readingsOf, seedUploadGroups, type Seeded } from "./lib/upload-groups";

const seed = () => seedUploadGroups(GROUPS);
const readingsFor = (g: Seeded["groups"][number], seedValue: number) => readingsOf(g, seedValue, ROWS);

const DB_NAME = "ratebook_bench";
const GROUPS = Number(process.env.BENCH_GROUPS ?? 200);
const ROWS = Number(process.env.BENCH_ROWS ?? 5000);
const IN_FLIGHT = Number(process.env.BENCH_IN_FLIGHT ?? 20);
const BURST_SECONDS = Number(process.env.BENCH_BURST_SECONDS ?? 30);
const OUTAGE_SECONDS = Number(process.env.BENCH_OUTAGE_SECONDS ?? 3);
const WORKER_CONCURRENCY = process.env.WORKER_CONCURRENCY ?? "4";
/** an answer slower than this is a hang */
const HANG_MS = 10_000;
/** a submission not marked this long after it was stored is lost */
const MARK_TIMEOUT_MS = 120_000;
const POLL_MS = 100;
const TARGET_P95_MS = 1000;
/** how fast the outage answer must come (common practice, no source: a client should not wait) */
const TARGET_OUTAGE_ANSWER_MS = 1000;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const now = () => performance.timeOrigin + performance.now();

type AnswerKind = "accepted" | "503 JSON" | "503 other" | "500" | "HTML page" | "other status" | "connection error" | "hang";
interface Attempt {
  startedAt: number;
  ms: number;
  kind: AnswerKind;
  status: number;
}
interface Upload {
  group: number;
  firstStart: number;
  acceptedStart: number;
  id: number | null;
  attempts: Attempt[];
  finalStatus: string | null;
  seenMarkedAt: number | null;
}

async function uploadOnce(g: Seeded["groups"][number], body: Awaited<ReturnType<typeof readingsFor>>): Promise<{ attempt: Attempt; id: number | null }> {
  const form = new FormData();
  form.append("reportedK", body.reportedK);
  form.append("reportedMethod", body.reportedMethod);
  form.append("file", new Blob([body.csv], { type: "text/csv" }), `group-${g.groupId}.csv`);
  const startedAt = now();
  try {
    const res = await fetch(`${BENCH_BASE}/api/groups/${g.groupId}/submissions`, {
      method: "POST",
      body: form,
      headers: { Authorization: `Bearer ${g.token}` },
      signal: AbortSignal.timeout(HANG_MS),
    });
    const type = res.headers.get("content-type") ?? "";
    const text = await res.text();
    const ms = now() - startedAt;
    let json: Record<string, unknown> | null = null;
    try {
      json = type.includes("json") ? JSON.parse(text) : null;
    } catch {
      json = null;
    }
    let kind: AnswerKind = "other status";
    if (res.status === 202 && json && typeof json.id === "number") kind = "accepted";
    else if (res.status === 503) kind = json && typeof json.error === "string" && json.error.length > 10 ? "503 JSON" : "503 other";
    else if (res.status >= 500) kind = "500";
    else if (type.includes("html")) kind = "HTML page";
    if (kind === "other status" || kind === "500" || kind === "HTML page" || kind === "503 other") {
      console.log(`[bench] group ${g.groupId}: ${res.status} ${type} ${text.slice(0, 200)}`);
    }
    return { attempt: { startedAt, ms, kind, status: res.status }, id: kind === "accepted" ? (json!.id as number) : null };
  } catch (error) {
    const ms = now() - startedAt;
    const name = (error as Error).name;
    const cause = (error as { cause?: { code?: string; message?: string } }).cause;
    if (name !== "TimeoutError") console.log(`[bench] group ${g.groupId}: no answer after ${ms.toFixed(0)} ms (${(error as Error).message}${cause ? `: ${cause.code ?? ""} ${cause.message ?? ""}` : ""})`);
    return { attempt: { startedAt, ms, kind: name === "TimeoutError" || name === "AbortError" ? "hang" : "connection error", status: 0 }, id: null };
  }
}

/** Polls one submission until it is no longer queued (or MARK_TIMEOUT_MS passes). */
async function waitForMark(u: Upload, token: string) {
  const deadline = now() + MARK_TIMEOUT_MS;
  while (now() < deadline) {
    await sleep(POLL_MS);
    try {
      const res = await fetch(`${BENCH_BASE}/api/submissions/${u.id}`, { headers: { Authorization: `Bearer ${token}` }, signal: AbortSignal.timeout(HANG_MS) });
      if (res.status !== 200) {
        await res.body?.cancel();
        continue;
      }
      const view = (await res.json()) as { status: string };
      if (view.status !== "queued") {
        u.finalStatus = view.status;
        u.seenMarkedAt = now();
        return;
      }
    } catch {
      // the database or the server may be restarting; keep asking until the deadline
    }
  }
}

/** One burst: arrivals spread over BURST_SECONDS, at most IN_FLIGHT uploads at once, retries with backoff. */
async function burst(seeded: Seeded, bodies: Array<Awaited<ReturnType<typeof readingsFor>>>, midway?: () => Promise<void>) {
  const uploads: Upload[] = [];
  const pollers: Promise<void>[] = [];
  let inFlight = 0;
  const waiters: Array<() => void> = [];
  const take = async () => {
    while (inFlight >= IN_FLIGHT) await new Promise<void>((r) => waiters.push(r));
    inFlight++;
  };
  const give = () => {
    inFlight--;
    waiters.shift()?.();
  };
  const t0 = now();
  const spacing = (BURST_SECONDS * 1000) / seeded.groups.length;
  const fault = midway ? sleep((BURST_SECONDS * 1000) / 2).then(midway) : Promise.resolve();
  const tasks = seeded.groups.map(async (g, i) => {
    await sleep(Math.max(0, t0 + i * spacing - now()));
    await take();
    const u: Upload = { group: g.groupId, firstStart: now(), acceptedStart: 0, id: null, attempts: [], finalStatus: null, seenMarkedAt: null };
    uploads.push(u);
    try {
      for (let n = 0; now() - u.firstStart < 60_000; n++) {
        const { attempt, id } = await uploadOnce(g, bodies[i]);
        u.attempts.push(attempt);
        if (id !== null) {
          u.id = id;
          u.acceptedStart = attempt.startedAt;
          break;
        }
        if (attempt.kind !== "503 JSON" && attempt.kind !== "connection error" && attempt.kind !== "hang") break; // not worth retrying
        await sleep(Math.min(1000, 100 * 2 ** n) * (0.5 + Math.random() / 2)); // backoff with jitter
      }
    } finally {
      give();
    }
    if (u.id !== null) pollers.push(waitForMark(u, g.token));
  });
  await Promise.all(tasks);
  const lastAccepted = now();
  await fault;
  await Promise.all(pollers);
  return { uploads, t0, lastAccepted };
}

function pct(values: number[], p: number): number {
  if (!values.length) return NaN;
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))];
}
const f0 = (x: number) => (Number.isFinite(x) ? x.toFixed(0) : "n/a");

// The view graphile_worker.jobs has no payload (0.17); the private tables do.
const MARK_JOBS =
  "(select j.payload, j.last_error from graphile_worker._private_jobs j join graphile_worker._private_tasks t on t.id = j.task_id where t.identifier = 'mark-submission')";

interface BurstChecks {
  stored: number;
  marked: number;
  refused: number;
  failed: number;
  queued: number;
  markedTwice: number;
  jobsLeft: number;
  failedJobs: number;
  groupsNotOne: number;
  latencies: number[];
  firstTryLatencies: number[];
}

async function checkBurst(client: pg.Pool, sessionId: number, version: number, uploads: Upload[]): Promise<BurstChecks> {
  const ids = uploads.filter((u) => u.id !== null).map((u) => u.id!);
  const rows = (
    await client.query<{ id: number; group_id: number; status: string; marking_runs: number; marked_ms: number | null }>(
      "select id, group_id, status, marking_runs, extract(epoch from marked_at) * 1000 as marked_ms from submissions where session_id = $1 and version >= $2",
      [sessionId, version],
    )
  ).rows;
  const byId = new Map(rows.map((r) => [r.id, r]));
  const jobs = (
    await client.query<{ n: number; failed: number }>(
      `select count(*)::int as n, count(*) filter (where last_error is not null)::int as failed from ${MARK_JOBS} j where (j.payload->>'submissionId')::int = any($1::int[])`,
      [ids],
    )
  ).rows[0];
  const perGroup = new Map<number, number>();
  for (const r of rows) if (r.status === "marked") perGroup.set(r.group_id, (perGroup.get(r.group_id) ?? 0) + 1);
  const groupsNotOne = uploads.filter((u) => perGroup.get(u.group) !== 1).length + rows.filter((r) => !uploads.some((u) => u.group === r.group_id)).length;
  const latencies: number[] = [];
  const firstTryLatencies: number[] = [];
  for (const u of uploads) {
    const r = u.id !== null ? byId.get(u.id) : undefined;
    if (r?.marked_ms == null) continue;
    latencies.push(Number(r.marked_ms) - u.acceptedStart);
    firstTryLatencies.push(Number(r.marked_ms) - u.firstStart);
  }
  return {
    stored: rows.length,
    marked: rows.filter((r) => r.status === "marked").length,
    refused: rows.filter((r) => r.status === "refused").length,
    failed: rows.filter((r) => r.status === "failed").length,
    queued: rows.filter((r) => r.status === "queued").length,
    markedTwice: rows.filter((r) => r.marking_runs > 1).length,
    jobsLeft: jobs.n,
    failedJobs: jobs.failed,
    groupsNotOne,
    latencies,
    firstTryLatencies,
  };
}

/** Half-stored submissions anywhere in the database. */
async function integrity(client: pg.Pool) {
  const one = async (sql: string) => (await client.query<{ n: number }>(sql)).rows[0].n;
  return {
    rowWithoutFile: await one("select count(*)::int as n from submissions s where not exists (select 1 from submission_files f where f.submission_id = s.id)"),
    fileWithoutRow: await one("select count(*)::int as n from submission_files f where not exists (select 1 from submissions s where s.id = f.submission_id)"),
    jobWithoutRow: await one(
      `select count(*)::int as n from ${MARK_JOBS} j where not exists (select 1 from submissions s where s.id = (j.payload->>'submissionId')::int)`,
    ),
    queuedWithoutJob: await one(
      `select count(*)::int as n from submissions s where s.status = 'queued' and not exists (select 1 from ${MARK_JOBS} j where (j.payload->>'submissionId')::int = s.id)`,
    ),
  };
}

function printBurst(title: string, b: Awaited<ReturnType<typeof burst>>, c: BurstChecks, withRetries: boolean) {
  const accepted = b.uploads.filter((u) => u.id !== null);
  const span = (b.lastAccepted - b.t0) / 1000;
  const answerMs = accepted.map((u) => u.attempts[u.attempts.length - 1].ms);
  console.log(`\n${title}`);
  console.log(`  uploads accepted ${accepted.length} of ${b.uploads.length}, in ${span.toFixed(1)} s = ${(accepted.length / span).toFixed(1)} uploads/s`);
  console.log(`  stored ${c.stored}, marked ${c.marked}, refused ${c.refused}, marking failed ${c.failed}, still queued ${c.queued}`);
  console.log(`  duplicates: marked twice ${c.markedTwice}, mark jobs left in the queue ${c.jobsLeft} (failed ${c.failedJobs}), groups without exactly one marked version ${c.groupsNotOne}`);
  console.log(`  upload answer (202) ms: p50 ${f0(pct(answerMs, 50))}, p95 ${f0(pct(answerMs, 95))}, max ${f0(Math.max(...answerMs))}`);
  console.log(`  upload start -> stored mark ms: p50 ${f0(pct(c.latencies, 50))}, p95 ${f0(pct(c.latencies, 95))}, max ${f0(Math.max(...c.latencies))} (target p95 < ${TARGET_P95_MS})`);
  if (withRetries) console.log(`  first try -> stored mark ms (with retries): p50 ${f0(pct(c.firstTryLatencies, 50))}, p95 ${f0(pct(c.firstTryLatencies, 95))}, max ${f0(Math.max(...c.firstTryLatencies))}`);
  const notSeen = accepted.filter((u) => u.finalStatus === null).length;
  if (notSeen) console.log(`  ${notSeen} accepted uploads were never seen marked through GET /api/submissions/:id within ${MARK_TIMEOUT_MS / 1000} s`);
}

function runChild(cmd: string, argv: string[]): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    const child = spawn(cmd, argv, { stdio: ["ignore", "pipe", "pipe"] });
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    child.on("exit", (code) => resolve({ code, out }));
  });
}

/** `npm run worker` as a process of its own; resolves once it says it is running. */
async function startWorkerProcess(): Promise<ChildProcess> {
  const child = spawn(path.join(projectRoot, "node_modules", ".bin", "tsx"), ["scripts/worker.ts"], {
    cwd: projectRoot,
    env: { ...process.env, WORKER_CONCURRENCY, NODE_ENV: "production", APP_URL: BENCH_BASE, SESSION_COOKIE_SECURE: "0" },
    stdio: ["ignore", "pipe", "inherit"],
  });
  await new Promise<void>((resolve, reject) => {
    let out = "";
    child.stdout!.on("data", (d) => {
      out += d;
      if (out.includes("worker running")) resolve();
    });
    child.once("exit", (code) => reject(new Error(`the worker exited (${code}) before it ran`)));
  });
  return child;
}

/** Waits until no marking job is waiting (the demo data's own submissions, at start). */
async function queueDrained(client: pg.Pool) {
  for (let i = 0; i < 600; i++) {
    const { n } = (await client.query<{ n: number }>(`select count(*)::int as n from ${MARK_JOBS} j`)).rows[0];
    if (n === 0) return;
    await sleep(200);
  }
  throw new Error("the demo data's marking jobs did not finish in 120 s");
}

// ---------------------------------------------------------------------------------------------
const misses: string[] = [];
const db = await openBenchDatabase(DB_NAME);
let app: Awaited<ReturnType<typeof startAppServer>> | null = null;
let worker: ChildProcess | null = null;
let stopping = false;
const pool = new pg.Pool({ connectionString: db.url, max: 2 });
pool.on("error", () => undefined); // idle connections die with the restart; the pool makes new ones
try {
  console.log(`[bench] seeding ${GROUPS} groups ...`);
  const seeded = await seed();
  await db.close();
  const bodies1 = await Promise.all(seeded.groups.map((g, i) => readingsFor(g, 1000 + i)));
  const bodies2 = await Promise.all(seeded.groups.map((g, i) => readingsFor(g, 5000 + i)));
  ensureBuild();
  app = await startAppServer();
  worker = await startWorkerProcess();
  worker.on("exit", (code, signal) => stopping || console.log(`[bench] the worker exited by itself (${code ?? signal})`));
  await queueDrained(pool);
  const kB = bodies1.reduce((s, b) => s + b.csv.length, 0) / bodies1.length / 1024;
  console.log(
    `[bench] ${GROUPS} groups, ${ROWS}-row CSV each (${kB.toFixed(0)} kB), arrivals spread over ${BURST_SECONDS} s, at most ${IN_FLIGHT} uploads in flight, worker concurrency ${WORKER_CONCURRENCY}; ${machineNote()}`,
  );

  // 2. The burst.
  const b1 = await burst(seeded, bodies1);
  const c1 = await checkBurst(pool, seeded.sessionId, 1, b1.uploads);
  printBurst("Burst: every group uploads once", b1, c1, false);
  const p95 = pct(c1.latencies, 95);
  if (!(p95 < TARGET_P95_MS)) misses.push(`burst p95 upload->mark ${f0(p95)} ms (target < ${TARGET_P95_MS})`);
  if (c1.marked !== GROUPS || c1.stored !== GROUPS) misses.push(`burst: stored ${c1.stored}, marked ${c1.marked} of ${GROUPS}`);
  if (c1.markedTwice || c1.jobsLeft || c1.groupsNotOne) misses.push("burst: a submission marked twice, a job left over, or a group without exactly one marked version");

  // 3. The same burst with PostgreSQL stopped halfway and started again.
  const outage = { stopBegan: 0, stopped: 0, startBegan: 0, started: 0, stopOut: "", startOut: "" };
  const restart = async () => {
    const stop = clusterControl("stop");
    outage.stopBegan = now();
    const s = await runChild(stop.cmd, stop.argv);
    outage.stopped = now();
    outage.stopOut = s.code === 0 ? "" : s.out;
    await sleep(OUTAGE_SECONDS * 1000);
    const start = clusterControl("start");
    outage.startBegan = now();
    const r = await runChild(start.cmd, start.argv);
    outage.started = now();
    outage.startOut = r.code === 0 ? "" : r.out;
  };
  const b2 = await burst(seeded, bodies2, restart);
  if (outage.stopOut || outage.startOut) console.log(`[bench] pg_ctl said:\n${outage.stopOut}${outage.startOut}`);
  const c2 = await checkBurst(pool, seeded.sessionId, 2, b2.uploads);
  printBurst(
    `Fault: the same burst, PostgreSQL stopped ${((outage.stopBegan - b2.t0) / 1000).toFixed(1)} s in (pg_ctl stop -m fast took ${((outage.stopped - outage.stopBegan) / 1000).toFixed(1)} s), held down ${OUTAGE_SECONDS} s, started again (pg_ctl start took ${((outage.started - outage.startBegan) / 1000).toFixed(1)} s)`,
    b2,
    c2,
    true,
  );
  const attempts = b2.uploads.flatMap((u) => u.attempts);
  const failedAttempts = attempts.filter((a) => a.kind !== "accepted");
  const kinds = new Map<AnswerKind, number[]>();
  for (const a of failedAttempts) kinds.set(a.kind, [...(kinds.get(a.kind) ?? []), a.ms]);
  console.log(`  upload attempts ${attempts.length}: accepted ${attempts.length - failedAttempts.length}, refused for the outage ${failedAttempts.length}`);
  for (const [kind, ms] of kinds) console.log(`    ${kind.padEnd(16)} ${String(ms.length).padStart(4)}  answered in ms: p50 ${f0(pct(ms, 50))}, p95 ${f0(pct(ms, 95))}, max ${f0(Math.max(...ms))}`);
  const retried = b2.uploads.filter((u) => u.attempts.length > 1);
  console.log(`  groups that retried ${retried.length}; most attempts by one group ${Math.max(0, ...b2.uploads.map((u) => u.attempts.length))}; never accepted ${b2.uploads.filter((u) => u.id === null).length}`);
  const half = await integrity(pool);
  console.log(
    `  half-stored: submission without its file ${half.rowWithoutFile}, file without its submission ${half.fileWithoutRow}, mark job without its submission ${half.jobWithoutRow}, queued submission without a job ${half.queuedWithoutJob}`,
  );
  const outageKinds = [...kinds.keys()].filter((k) => k !== "503 JSON");
  if (outageKinds.length) misses.push(`fault: answers during the outage other than a JSON 503: ${outageKinds.join(", ")}`);
  const slow503 = pct(kinds.get("503 JSON") ?? [], 100);
  if (slow503 > TARGET_OUTAGE_ANSWER_MS) misses.push(`fault: slowest 503 took ${f0(slow503)} ms (target < ${TARGET_OUTAGE_ANSWER_MS})`);
  if (!kinds.get("503 JSON")?.length) misses.push("fault: no upload met the outage (no 503 seen); raise BENCH_OUTAGE_SECONDS");
  if (c2.marked !== GROUPS || c2.stored !== GROUPS || c2.groupsNotOne || c2.markedTwice || c2.jobsLeft) misses.push("fault: not every group has exactly one marked version, or one was stored or marked twice");
  if (Object.values(half).some((n) => n > 0)) misses.push("fault: half-stored submissions");
} finally {
  stopping = true;
  if (worker) await stopChild(worker);
  if (app) await app.stop();
  await pool.end().catch(() => undefined);
  await db.close().catch(() => undefined);
  await dropDatabase(DB_NAME).catch((e) => console.error(`[bench] could not drop ${DB_NAME}: ${(e as Error).message}`));
}
console.log(misses.length ? `\nMISSED:\n  ${misses.join("\n  ")}` : "\nAll targets met.");
process.exit(misses.length ? 1 : 0);
