// `npm run bench:cluster` : the deployment of README's "Deploying on several machines", on this
// one machine, proven through HTTPS only. It starts:
//   - nginx from Debian's package (installed when missing and run as root) terminating TLS with a
//     certificate made now with openssl, balancing two app servers (no sticky sessions);
//   - two app servers from the production build (`npm run serve`, NODE_ENV=production, one
//     SESSION_SECRET, TRUST_PROXY=1, APP_URL the balancer's https address);
//   - two queue workers (`npm run worker`), one PostgreSQL (this clone's cluster, its own
//     database `ratebook_cluster`, dropped at the end), a mail sink for the demo's mail jobs.
// Then, through the balancer only: the demo instructor signs in with the page form; the session
// is used on both app servers; the upload burst of the marking benchmark (scripts/bench/lib/
// upload-groups.ts: every group uploads a 5,000-row CSV with its token, arrivals over
// BENCH_BURST_SECONDS) during which one app server and one worker are SIGKILLed and PostgreSQL
// is restarted once; the signed-in practical gradebook (API and page) and a static file under
// load. It prints what was stored and marked (each once, none lost), the failover, p95
// upload-to-marked and req/s / p99, and exits 1 when something was lost or doubled.
// Only 127.0.0.1 is contacted. Ports: BENCH_CLUSTER_PORT (4160) for HTTPS, the next two for the
// app servers, the two after for the mail sink. Usage: npm run bench:cluster (as root on a clean
// clone: it installs nginx if needed and builds).
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { stopChild } from "../lib/child-process";
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

const BASE_PORT = Number(process.env.BENCH_CLUSTER_PORT ?? 4160);
const HTTPS = `https://127.0.0.1:${BASE_PORT}`;
const work = process.env.RATEBOOK_CLUSTER_DIR;

// Step 0 (parent): the certificate, then this script again with Node trusting it, so that every
// request below verifies the balancer's certificate as a browser would.
if (!work) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ratebook-cluster-"));
  fs.chmodSync(dir, 0o755);
  const cert = spawnSync(
    "openssl",
    ["req", "-x509", "-newkey", "rsa:2048", "-nodes", "-days", "1", "-subj", "/CN=ratebook-cluster.test", "-addext", "subjectAltName=IP:127.0.0.1,DNS:localhost",
      "-keyout", path.join(dir, "key.pem"), "-out", path.join(dir, "cert.pem")],
    { encoding: "utf8" },
  );
  if (cert.status !== 0) {
    console.error(`[cluster] openssl could not make a certificate:\n${cert.stderr}`);
    process.exit(1);
  }
  const child = spawn(process.execPath, [...process.execArgv, ...process.argv.slice(1)], {
    stdio: "inherit",
    env: { ...process.env, RATEBOOK_CLUSTER_DIR: dir, NODE_EXTRA_CA_CERTS: path.join(dir, "cert.pem") },
  });
  const code = await new Promise<number>((resolve) => child.on("exit", (c, s) => resolve(c ?? (s ? 1 : 0))));
  fs.rmSync(dir, { recursive: true, force: true });
  process.exit(code);
}

const { projectRoot, clusterControl, dropDatabase } = await import("../lib/postgres");
const { ensureBuild, load, machineNote, openBenchDatabase, printLoadTable, staticAssetPath } = await import("./lib/http-load");
const { readingsFor, seedUploadGroups } = await import("./lib/upload-groups");
const { startMailSink } = await import("../lib/mail-sink");
const pg = (await import("pg")).default;

const GROUPS = Number(process.env.BENCH_GROUPS ?? 200);
const ROWS = Number(process.env.BENCH_ROWS ?? 5000);
const IN_FLIGHT = Number(process.env.BENCH_IN_FLIGHT ?? 20);
const BURST_SECONDS = Number(process.env.BENCH_BURST_SECONDS ?? 30);
const LOAD_SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const OUTAGE_SECONDS = Number(process.env.BENCH_OUTAGE_SECONDS ?? 3);
const WORKER_CONCURRENCY = process.env.WORKER_CONCURRENCY ?? "2";
/** jobs a SIGKILLed worker held stay locked (graphile-worker unlocks them after 4 h): the operator's step below */
const STALE_LOCK_SECONDS = Number(process.env.BENCH_STALE_LOCK_SECONDS ?? 30);
const MARK_TIMEOUT_MS = 180_000;
const DB_NAME = "ratebook_cluster";
const APP_PORTS = [BASE_PORT + 1, BASE_PORT + 2];
const INSTRUCTOR = { email: "instructor@demo.ratebook.invalid", password: "demo-instructor-pass" };
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const now = () => performance.timeOrigin + performance.now();
const misses: string[] = [];
const children = new Set<ChildProcess>();
let finishing = false;

function pct(values: number[], p: number): number {
  if (!values.length) return NaN;
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))];
}
const f0 = (x: number) => (Number.isFinite(x) ? x.toFixed(0) : "n/a");

// ---- nginx ------------------------------------------------------------------------------------
function ensureNginx(): string {
  const found = ["/usr/sbin/nginx", "/usr/bin/nginx"].find((p) => fs.existsSync(p));
  if (found) return found;
  if (process.getuid?.() !== 0) throw new Error("nginx is not installed: sudo apt-get install -y nginx-light (or nginx)");
  console.log("[cluster] nginx missing; installing Debian's package ...");
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  spawnSync("apt-get", ["update", "-q"], { stdio: "inherit", env });
  const res = spawnSync("apt-get", ["install", "-y", "-q", "nginx"], { stdio: "inherit", env });
  if (res.status !== 0 || !fs.existsSync("/usr/sbin/nginx")) throw new Error("apt-get install nginx failed");
  return "/usr/sbin/nginx";
}

function nginxConfig(dir: string): string {
  for (const d of ["body", "proxy", "fastcgi", "uwsgi", "scgi"]) {
    fs.mkdirSync(path.join(dir, d), { recursive: true });
    fs.chmodSync(path.join(dir, d), 0o777); // nginx's workers run as nobody when started by root
  }
  return `
worker_processes 1;
pid ${dir}/nginx.pid;
error_log ${dir}/error.log warn;
events { worker_connections 1024; }
http {
  access_log off;
  client_body_temp_path ${dir}/body;
  proxy_temp_path ${dir}/proxy;
  fastcgi_temp_path ${dir}/fastcgi;
  uwsgi_temp_path ${dir}/uwsgi;
  scgi_temp_path ${dir}/scgi;
  client_max_body_size 25m;
  upstream ratebook {
    server 127.0.0.1:${APP_PORTS[0]} max_fails=1 fail_timeout=5s;
    server 127.0.0.1:${APP_PORTS[1]} max_fails=1 fail_timeout=5s;
    keepalive 32;
  }
  server {
    listen 127.0.0.1:${BASE_PORT} ssl;
    ssl_certificate ${dir}/cert.pem;
    ssl_certificate_key ${dir}/key.pem;
    ssl_protocols TLSv1.2 TLSv1.3;
    location / {
      proxy_pass http://ratebook;
      proxy_http_version 1.1;
      proxy_set_header Connection "";
      proxy_set_header Host $host:$server_port;
      proxy_set_header X-Forwarded-For $proxy_add_x_forwarded_for;
      proxy_set_header X-Forwarded-Proto https;
      proxy_set_header X-Request-Id $request_id;
      # a refused connection (a dead server) goes to the other one; a request already sent is not repeated
      proxy_next_upstream error timeout;
      proxy_connect_timeout 2s;
      proxy_read_timeout 60s;
      add_header X-Upstream $upstream_addr always;
    }
  }
}
`;
}

// ---- processes --------------------------------------------------------------------------------
function track(child: ChildProcess, name: string, logFile: string) {
  children.add(child);
  const out = fs.createWriteStream(logFile, { flags: "a" });
  child.stdout?.pipe(out);
  child.stderr?.pipe(out);
  child.on("exit", (code, signal) => {
    children.delete(child);
    if (!finishing && signal !== "SIGKILL") console.log(`[cluster] ${name} exited by itself (${code ?? signal}); its log: ${logFile}`);
  });
  return child;
}

async function waitFor(url: string, ms: number, what: string) {
  const t0 = now();
  while (now() - t0 < ms) {
    try {
      const res = await fetch(url, { signal: AbortSignal.timeout(2000) });
      await res.body?.cancel();
      if (res.status < 500) return now() - t0;
    } catch {
      /* not yet */
    }
    await sleep(100);
  }
  throw new Error(`${what} did not answer at ${url} within ${ms} ms`);
}

function appEnv(databaseUrl: string, sinkPorts: [number, number]): NodeJS.ProcessEnv {
  return {
    ...process.env,
    NODE_ENV: "production",
    DATABASE_URL: databaseUrl,
    SESSION_SECRET: sessionSecret,
    APP_URL: HTTPS,
    TRUST_PROXY: "1",
    SMTP_URL: `smtp://127.0.0.1:${sinkPorts[0]}`,
    MAIL_SINK_URL: `http://127.0.0.1:${sinkPorts[1]}`,
    LOG_LEVEL: "warn",
    BCRYPT_COST: "4",
    NODE_EXTRA_CA_CERTS: "",
  };
}

function startApp(i: number, env: NodeJS.ProcessEnv) {
  // node itself with tsx's loader (not the tsx wrapper): SIGKILL must reach the server, not a parent
  const child = spawn(process.execPath, ["--import", "tsx", "scripts/serve.ts"], { cwd: projectRoot, env: { ...env, PORT: String(APP_PORTS[i]), HOST: "127.0.0.1", RATEBOOK_SERVICE: `app-${i + 1}` }, stdio: ["ignore", "pipe", "pipe"] });
  return track(child, `app server ${i + 1}`, path.join(work!, `app-${i + 1}.log`));
}

async function startWorker(i: number, env: NodeJS.ProcessEnv) {
  const child = spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts"], { cwd: projectRoot, env: { ...env, WORKER_CONCURRENCY, RATEBOOK_SERVICE: `worker-${i + 1}` }, stdio: ["ignore", "pipe", "pipe"] });
  track(child, `worker ${i + 1}`, path.join(work!, `worker-${i + 1}.log`));
  await new Promise<void>((resolve, reject) => {
    let out = "";
    child.stdout!.on("data", (d) => {
      out += d;
      if (out.includes("worker running")) resolve();
    });
    child.once("exit", (code) => reject(new Error(`worker ${i + 1} exited (${code}) before it ran`)));
  });
  return child;
}

// ---- the upload burst (through the balancer) ---------------------------------------------------
type Group = Awaited<ReturnType<typeof seedUploadGroups>>["groups"][number];
type Body = Awaited<ReturnType<typeof readingsFor>>;
interface Attempt {
  startedAt: number;
  endedAt: number;
  status: number; // 0: no answer
}
interface Upload {
  group: Group;
  name: string;
  firstStart: number;
  acceptedAt: number;
  id: number | null;
  attempts: Attempt[];
  /** the upload was found stored after its answer was lost (so it was not sent again) */
  foundStored: boolean;
  seenMarkedAt: number | null;
}

async function uploadOnce(u: Upload, body: Body): Promise<{ attempt: Attempt; id: number | null }> {
  const form = new FormData();
  form.append("reportedK", body.reportedK);
  form.append("reportedMethod", body.reportedMethod);
  form.append("file", new Blob([body.csv], { type: "text/csv" }), u.name);
  const startedAt = now();
  try {
    const res = await fetch(`${HTTPS}/api/groups/${u.group.groupId}/submissions`, { method: "POST", body: form, headers: { Authorization: `Bearer ${u.group.token}` }, signal: AbortSignal.timeout(30_000) });
    const text = await res.text();
    let id: number | null = null;
    if (res.status === 202) id = (JSON.parse(text) as { id: number }).id;
    else if (res.status !== 503 && res.status !== 502) console.log(`[cluster] group ${u.group.groupId}: ${res.status} ${text.slice(0, 160)}`);
    return { attempt: { startedAt, endedAt: now(), status: res.status }, id };
  } catch {
    return { attempt: { startedAt, endedAt: now(), status: 0 }, id: null };
  }
}

/** After a lost answer: is our file stored already? (the client looks before it sends again) */
async function storedAlready(u: Upload): Promise<number | null | "unknown"> {
  try {
    const res = await fetch(`${HTTPS}/api/groups/${u.group.groupId}/submissions`, { headers: { Authorization: `Bearer ${u.group.token}` }, signal: AbortSignal.timeout(10_000) });
    if (res.status !== 200) {
      await res.body?.cancel();
      return "unknown";
    }
    const { submissions } = (await res.json()) as { submissions: Array<{ id: number; originalName: string }> };
    return submissions.find((s) => s.originalName === u.name)?.id ?? null;
  } catch {
    return "unknown";
  }
}

async function waitForMark(u: Upload) {
  const deadline = now() + MARK_TIMEOUT_MS;
  while (now() < deadline) {
    await sleep(150);
    try {
      const res = await fetch(`${HTTPS}/api/submissions/${u.id}`, { headers: { Authorization: `Bearer ${u.group.token}` }, signal: AbortSignal.timeout(10_000) });
      if (res.status !== 200) {
        await res.body?.cancel();
        continue;
      }
      if (((await res.json()) as { status: string }).status !== "queued") {
        u.seenMarkedAt = now();
        return;
      }
    } catch {
      /* a restart in progress: ask again */
    }
  }
}

async function burst(groups: Group[], bodies: Body[], faults: Array<{ at: number; run: () => Promise<void> }>) {
  const uploads: Upload[] = [];
  const pollers: Promise<void>[] = [];
  let inFlight = 0;
  const waiters: Array<() => void> = [];
  const t0 = now();
  const faultRuns = faults.map((f) =>
    sleep(f.at * 1000)
      .then(f.run)
      .catch((error) => void misses.push(`a fault step failed: ${(error as Error).message}`)),
  );
  const spacing = (BURST_SECONDS * 1000) / groups.length;
  await Promise.all(
    groups.map(async (g, i) => {
      await sleep(Math.max(0, t0 + i * spacing - now()));
      while (inFlight >= IN_FLIGHT) await new Promise<void>((r) => waiters.push(r));
      inFlight++;
      const u: Upload = { group: g, name: `cluster-group-${g.groupId}.csv`, firstStart: now(), acceptedAt: 0, id: null, attempts: [], foundStored: false, seenMarkedAt: null };
      uploads.push(u);
      try {
        for (let n = 0; now() - u.firstStart < 90_000; n++) {
          const { attempt, id } = await uploadOnce(u, bodies[i]);
          u.attempts.push(attempt);
          if (id !== null) {
            u.id = id;
            u.acceptedAt = attempt.startedAt;
            break;
          }
          if (![0, 502, 503, 504].includes(attempt.status)) break;
          await sleep(Math.min(1000, 100 * 2 ** n) * (0.5 + Math.random() / 2));
          // the answer was lost (not a refusal): the upload may have been stored before the server died
          if (attempt.status !== 503) {
            let found = await storedAlready(u);
            for (let k = 0; found === "unknown" && k < 50; k++) {
              await sleep(200);
              found = await storedAlready(u);
            }
            if (typeof found === "number") {
              u.id = found;
              u.acceptedAt = attempt.startedAt;
              u.foundStored = true;
              break;
            }
          }
        }
      } finally {
        inFlight--;
        waiters.shift()?.();
      }
      if (u.id !== null) pollers.push(waitForMark(u));
    }),
  );
  await Promise.all(faultRuns);
  await Promise.all(pollers);
  return { uploads, t0 };
}

// ---- run ----------------------------------------------------------------------------------------
const sessionSecret = crypto.randomBytes(32).toString("hex");
const nginxBin = ensureNginx();
ensureBuild();
const db = await openBenchDatabase(DB_NAME);
const pool = new pg.Pool({ connectionString: db.url, max: 2 });
pool.on("error", () => undefined);
const sink = await startMailSink({ smtpPort: BASE_PORT + 3, httpPort: BASE_PORT + 4 });
let nginxStarted = false;
const apps: Array<ChildProcess | null> = [null, null];
const workers: Array<ChildProcess | null> = [null, null];
try {
  console.log(`[cluster] seeding ${GROUPS} groups ...`);
  const seeded = await seedUploadGroups(GROUPS, "BENCH-CLUSTER");
  const { Course, CourseMembership, User } = await import("../../app/.server/db/models.server");
  const instructor = await User.findOne({ where: { email: INSTRUCTOR.email } });
  const course = await Course.findOne({ where: { code: "BENCH-CLUSTER" } });
  await CourseMembership.create({ courseId: course!.id, userId: instructor!.id, role: "instructor" });
  await db.close();
  const bodies = await Promise.all(seeded.groups.map((g, i) => readingsFor(g, 7000 + i, ROWS)));

  const env = appEnv(db.url!, [BASE_PORT + 3, BASE_PORT + 4]);
  apps[0] = startApp(0, env);
  apps[1] = startApp(1, env);
  await Promise.all(APP_PORTS.map((p, i) => waitFor(`http://127.0.0.1:${p}/healthz`, 90_000, `app server ${i + 1}`)));
  workers[0] = await startWorker(0, env);
  workers[1] = await startWorker(1, env);
  fs.writeFileSync(path.join(work, "nginx.conf"), nginxConfig(work));
  const ng = spawnSync(nginxBin, ["-c", path.join(work, "nginx.conf"), "-p", work], { encoding: "utf8" });
  if (ng.status !== 0) throw new Error(`nginx did not start:\n${ng.stderr}`);
  nginxStarted = true;
  await waitFor(`${HTTPS}/healthz`, 20_000, "nginx");
  const health = (await (await fetch(`${HTTPS}/healthz`)).json()) as object;
  console.log(`[cluster] up: nginx TLS on ${HTTPS} -> app servers on ${APP_PORTS.join(", ")}; 2 workers (concurrency ${WORKER_CONCURRENCY} each); PostgreSQL ${db.url!.replace(/\/\/[^@]*@/, "//")}; /healthz ${JSON.stringify(health)}`);
  console.log(`[cluster] ${machineNote()}`);

  // 1. Sign in with the page form, as the browser sends it.
  const plain = await fetch(`http://127.0.0.1:${BASE_PORT}/sign-in`).then((r) => `${r.status} (nginx refuses plain HTTP on its TLS port)`, () => "refused");
  const signInRes = await fetch(`${HTTPS}/sign-in`, {
    method: "POST",
    headers: { origin: HTTPS, "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams(INSTRUCTOR),
    redirect: "manual",
  });
  const setCookie = signInRes.headers.get("set-cookie") ?? "";
  const cookie = setCookie.split(";")[0];
  const foreign = await fetch(`${HTTPS}/sign-in`, { method: "POST", headers: { origin: "https://elsewhere.example", "content-type": "application/x-www-form-urlencoded" }, body: new URLSearchParams(INSTRUCTOR), redirect: "manual" });
  console.log(`\nSign-in (page form, through HTTPS): ${signInRes.status} -> ${signInRes.headers.get("location")}, cookie ${/;\s*Secure/i.test(setCookie) ? "Secure" : "NOT Secure"} HttpOnly=${/HttpOnly/i.test(setCookie)}; a foreign origin: ${foreign.status}; plain http to the balancer: ${plain}`);
  if (signInRes.status !== 302 || !cookie || !/;\s*Secure/i.test(setCookie)) misses.push(`sign-in through HTTPS gave ${signInRes.status}`);
  if (foreign.status !== 400) misses.push(`a foreign origin's sign-in gave ${foreign.status}, not 400`);

  // 2. The same session on either server.
  const byUpstream = new Map<string, number[]>();
  for (let i = 0; i < 20; i++) {
    const res = await fetch(`${HTTPS}/api/me`, { headers: { cookie } });
    await res.body?.cancel();
    const up = res.headers.get("x-upstream") ?? "?";
    byUpstream.set(up, [...(byUpstream.get(up) ?? []), res.status]);
  }
  console.log(`Session on either server: ${[...byUpstream].map(([up, st]) => `${up}: ${st.length} x ${[...new Set(st)].join("/")}`).join("; ")}`);
  if (byUpstream.size < 2 || [...byUpstream.values()].flat().some((s) => s !== 200)) misses.push("the session was not valid on both app servers");

  // 3. The burst, with the faults.
  const marks = { appKilledAt: 0, appBackAfterMs: 0, workerKilledAt: 0, pgStopAt: 0, pgStartedAt: 0, killedWorkerLocks: 0, unlockedAt: 0 };
  const faults = [
    {
      at: BURST_SECONDS * 0.25,
      run: async () => {
        marks.appKilledAt = now();
        apps[0]!.kill("SIGKILL");
        await sleep(5000); // the orchestrator notices and starts it again
        apps[0] = startApp(0, env);
        marks.appBackAfterMs = now() - marks.appKilledAt + (await waitFor(`http://127.0.0.1:${APP_PORTS[0]}/healthz`, 90_000, "app server 1 again"));
      },
    },
    {
      at: BURST_SECONDS * 0.4,
      run: async () => {
        marks.workerKilledAt = now();
        workers[0]!.kill("SIGKILL");
        await sleep(3000);
        // as a supervisor would: start it again, and again while the database is not there
        for (let k = 0; ; k++) {
          try {
            workers[0] = await startWorker(0, env);
            break;
          } catch (error) {
            if (k >= 20) throw error;
            await sleep(1000);
          }
        }
      },
    },
    {
      at: BURST_SECONDS * 0.6,
      run: async () => {
        const stop = clusterControl("stop");
        marks.pgStopAt = now();
        spawnSync(stop.cmd, stop.argv, { stdio: "ignore" });
        await sleep(OUTAGE_SECONDS * 1000);
        const start = clusterControl("start");
        spawnSync(start.cmd, start.argv, { stdio: "ignore" });
        marks.pgStartedAt = now();
      },
    },
  ];
  // The operator's step for a SIGKILLed worker: jobs locked longer than STALE_LOCK_SECONDS by a
  // worker id that no longer takes jobs are unlocked (graphile_worker.force_unlock_workers).
  let unlocking = true;
  const unlocker = (async () => {
    while (unlocking) {
      await sleep(1000);
      if (!marks.workerKilledAt) continue;
      try {
        const stale = (
          await pool.query<{ locked_by: string; n: number }>(
            "select locked_by, count(*)::int as n from graphile_worker._private_jobs where locked_by is not null and locked_at < now() - make_interval(secs => $1) group by locked_by",
            [STALE_LOCK_SECONDS],
          )
        ).rows;
        if (stale.length) {
          marks.killedWorkerLocks += stale.reduce((s, r) => s + r.n, 0);
          await pool.query("select graphile_worker.force_unlock_workers($1::text[])", [stale.map((r) => r.locked_by)]);
          marks.unlockedAt = now();
        }
      } catch {
        /* PostgreSQL restarting */
      }
    }
  })();
  console.log(`\nUpload burst: ${GROUPS} groups, ${ROWS}-row CSV each, over ${BURST_SECONDS} s, at most ${IN_FLIGHT} in flight; SIGKILL app server 1 at ${f0(BURST_SECONDS * 0.25)} s (started again 5 s later), SIGKILL worker 1 at ${f0(BURST_SECONDS * 0.4)} s (started again 3 s later), PostgreSQL stopped at ${f0(BURST_SECONDS * 0.6)} s for ${OUTAGE_SECONDS} s`);
  const b = await burst(seeded.groups, bodies, faults);
  unlocking = false;
  await unlocker;

  const rows = (
    await pool.query<{ id: number; group_id: number; status: string; marking_runs: number; marked_ms: number | null }>(
      "select id, group_id, status, marking_runs, extract(epoch from marked_at) * 1000 as marked_ms from submissions where session_id = $1",
      [seeded.sessionId],
    )
  ).rows;
  const perGroup = new Map<number, number>();
  for (const r of rows) perGroup.set(r.group_id, (perGroup.get(r.group_id) ?? 0) + 1);
  const storedTwice = [...perGroup.values()].filter((n) => n > 1).length;
  const groupsWithout = seeded.groups.filter((g) => !perGroup.has(g.groupId)).length;
  const marked = rows.filter((r) => r.status === "marked").length;
  const markedTwice = rows.filter((r) => r.marking_runs > 1).length;
  const notMarked = rows.filter((r) => r.status === "queued").length;
  const jobsLeft = (await pool.query<{ n: number }>("select count(*)::int as n from graphile_worker._private_jobs j join graphile_worker._private_tasks t on t.id = j.task_id where t.identifier = 'mark-submission'")).rows[0].n;
  const byId = new Map(rows.map((r) => [r.id, r]));
  const latencies = b.uploads.flatMap((u) => {
    const r = u.id !== null ? byId.get(u.id) : undefined;
    return r?.marked_ms != null ? [Number(r.marked_ms) - u.acceptedAt] : [];
  });
  const firstTry = b.uploads.flatMap((u) => {
    const r = u.id !== null ? byId.get(u.id) : undefined;
    return r?.marked_ms != null ? [Number(r.marked_ms) - u.firstStart] : [];
  });
  const attempts = b.uploads.flatMap((u) => u.attempts);
  const count = (f: (a: Attempt) => boolean) => attempts.filter(f).length;
  // Failover: from the SIGKILL to the last lost answer (502 or no answer) that any upload got.
  const lost = attempts.filter((a) => (a.status === 502 || a.status === 0) && a.endedAt >= marks.appKilledAt);
  const lastLost = lost.length ? Math.max(...lost.map((a) => a.endedAt)) : marks.appKilledAt;
  const startedAfterKillLost = lost.filter((a) => a.startedAt > marks.appKilledAt + 50).length;
  console.log(`  uploads: ${b.uploads.length} sent, ${b.uploads.filter((u) => u.id !== null).length} accepted; attempts ${attempts.length}: 202 ${count((a) => a.status === 202)}, 503 (database down) ${count((a) => a.status === 503)}, 502 ${count((a) => a.status === 502)}, no answer ${count((a) => a.status === 0)}, other ${count((a) => ![0, 202, 502, 503].includes(a.status))}`);
  console.log(`  stored ${rows.length} for ${perGroup.size} of ${GROUPS} groups: stored twice ${storedTwice}, groups with nothing stored ${groupsWithout}; lost answers found stored on a look before resending ${b.uploads.filter((u) => u.foundStored).length}`);
  console.log(`  marked ${marked}, marked twice ${markedTwice}, still queued ${notMarked}, mark jobs left ${jobsLeft}; seen marked through the API ${b.uploads.filter((u) => u.seenMarkedAt !== null).length}`);
  console.log(`  failover (app server 1 SIGKILLed): lost answers ${lost.length} (${startedAfterKillLost} of them sent after the kill), last one ${f0(lastLost - marks.appKilledAt)} ms after the kill; app server 1 answered again ${f0(marks.appBackAfterMs)} ms after the kill`);
  console.log(`  worker 1 SIGKILLed: jobs it held unlocked by the operator's step ${marks.killedWorkerLocks}${marks.unlockedAt ? ` at ${f0((marks.unlockedAt - marks.workerKilledAt) / 1000)} s after the kill` : ""}`);
  console.log(`  PostgreSQL stopped ${f0(marks.pgStartedAt - marks.pgStopAt)} ms (stop, ${OUTAGE_SECONDS} s down, start)`);
  console.log(`  upload -> marked ms (from the accepted try): p50 ${f0(pct(latencies, 50))}, p95 ${f0(pct(latencies, 95))}, max ${f0(Math.max(...latencies))}; from the first try: p95 ${f0(pct(firstTry, 95))}, max ${f0(Math.max(...firstTry))}`);
  if (rows.length !== GROUPS || storedTwice || groupsWithout) misses.push(`stored ${rows.length} for ${GROUPS} groups (twice ${storedTwice}, none ${groupsWithout})`);
  if (marked !== GROUPS || markedTwice || notMarked || jobsLeft) misses.push(`marked ${marked} of ${GROUPS} (twice ${markedTwice}, queued ${notMarked}, jobs left ${jobsLeft})`);
  if (startedAfterKillLost) misses.push(`${startedAfterKillLost} uploads sent after the kill lost their answer (the balancer should have sent them to the other server)`);

  // 4. The signed-in gradebook through the balancer, beside a static file through it.
  for (let i = 0; i < 20; i++) {
    const h = await fetch(`${HTTPS}/healthz`).then((r) => r.status, () => 0);
    if (h === 200) break;
    await sleep(500);
  }
  const runs = [
    await load("static file (JS asset) via nginx", `${HTTPS}${staticAssetPath()}`, { seconds: LOAD_SECONDS }),
    await load(`practical gradebook API (${GROUPS} groups), cookie`, `${HTTPS}/api/sessions/${seeded.sessionId}/gradebook`, { seconds: LOAD_SECONDS, headers: { cookie } }),
    await load(`practical gradebook page (${GROUPS} groups), cookie`, `${HTTPS}/sessions/${seeded.sessionId}/gradebook`, { seconds: LOAD_SECONDS, headers: { cookie } }),
  ];
  console.log(`\nThrough the balancer (HTTPS, 20 clients, ${LOAD_SECONDS} s each; ${machineNote()}):`);
  printLoadTable(runs);
  for (const r of runs) if (r.non2xx || r.errors) misses.push(`${r.label}: ${r.non2xx} non-2xx, ${r.errors} errors`);
} finally {
  finishing = true;
  if (nginxStarted) spawnSync(nginxBin, ["-c", path.join(work, "nginx.conf"), "-p", work, "-s", "stop"], { stdio: "ignore" });
  await Promise.all([...children].map((c) => stopChild(c)));
  await sink.close();
  await pool.end().catch(() => undefined);
  await dropDatabase(DB_NAME).catch((e) => console.error(`[cluster] could not drop ${DB_NAME}: ${(e as Error).message}`));
}
console.log(misses.length ? `\nMISSED:\n  ${misses.join("\n  ")}` : "\nAll checks passed: nothing lost, nothing stored or marked twice.");
process.exit(misses.length ? 1 : 0);
