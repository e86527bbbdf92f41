// The job worker (`npm run worker`, its own process) through PostgreSQL restarts: a marking burst
// with the server stopped (pg_ctl stop -m fast) for about 4 s and started again, twice. Every
// stored version ends marked exactly once, no marking job is left, and the worker process is the
// same one throughout and never died of an unhandled rejection (graphile-worker 0.17.3 leaves the
// promise that records a job's end unawaited; before the fix a 57P01 or ECONNREFUSED there ended
// the process). The readings are the engine's own closed forms (app/lib/marking/simulate.ts).
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { sequelize } from "~/.server/db/models.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { createSubmission } from "~/.server/submissions/service.server";
import { runCsv, simulateRun } from "~/lib/marking/simulate";
import { stopChild } from "../../scripts/lib/child-process";
import { clusterControl, projectRoot } from "../../scripts/lib/postgres";
import { makePractical, type Practical } from "./practical-fixture";

const GROUPS = 12; // benches of the fixture run 25 to 80 °C
const PER_BURST = 2; // versions each group stores in one burst
const ROWS = 4000;
const OUTAGE_MS = 4000;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

let p: Practical;
let worker: ChildProcess;
let output = "";
let exited: string | null = null;

/** A query that waits for the database to come back (the test's own connections die too). */
async function retrying<T>(work: () => Promise<T>, forMs = 60_000): Promise<T> {
  const until = Date.now() + forMs;
  for (;;) {
    try {
      return await work();
    } catch (error) {
      if (Date.now() > until) throw error;
      await sleep(250);
    }
  }
}

function pgCtl(action: "stop" | "start"): Promise<void> {
  const { cmd, argv } = clusterControl(action);
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, argv, { stdio: ["ignore", "pipe", "pipe"] });
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    child.on("exit", (code) => (code === 0 ? resolve() : reject(new Error(`pg_ctl ${action} failed (${code}): ${out}`))));
  });
}

async function counts(sessionId: number, versions: number[]) {
  const [rows] = await sequelize.query(
    "select count(*)::int as stored, count(*) filter (where status = 'marked')::int as marked from submissions where session_id = :sessionId and version in (:versions)",
    { replacements: { sessionId, versions } },
  );
  return (rows as Array<{ stored: number; marked: number }>)[0];
}

/**
 * One burst: every group stores PER_BURST more versions (4 uploads at a time, an upload the outage
 * refused is tried again); once the worker has marked a few and others wait, PostgreSQL is
 * stopped for OUTAGE_MS and started again. Returns how many versions were waiting at the stop.
 */
async function burstWithOutage(burst: number): Promise<number> {
  const versions = Array.from({ length: PER_BURST }, (_, i) => (burst - 1) * PER_BURST + i + 1);
  const todo = versions.flatMap((version) => Array.from({ length: GROUPS }, (_, g) => ({ g, version })));
  let waitingAtStop = -1;
  let next = 0;
  const uploader = async () => {
    for (let t = next++; t < todo.length; t = next++) {
      const { g, version } = todo[t];
      const bench = p.benches[g];
      const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: ROWS, seed: 100 * version + g });
      const bytes = new TextEncoder().encode(runCsv(run));
      await retrying(async () => {
        const [have] = await sequelize.query("select 1 from submissions where group_id = :groupId and version = :version", { replacements: { groupId: p.groups[g].id, version } });
        if (have.length) return; // stored, though the answer was lost in the outage
        await createSubmission(p.students[g], p.groups[g].id, { bytes, name: `run-${version}.csv`, type: "text/csv", size: bytes.byteLength }, {
          reportedK: String(run.reportedK), reportedMethod: run.reportedMethod, measured: "concentrationA",
        }, true);
      }, 90_000);
    }
  };
  const outage = (async () => {
    for (;;) {
      const c = await counts(p.session.id, versions);
      if (c.marked >= 2 && c.stored - c.marked >= 2) {
        waitingAtStop = c.stored - c.marked;
        break;
      }
      if (c.marked === todo.length) return; // all done before an outage could meet them: waitingAtStop stays -1
      await sleep(20);
    }
    await pgCtl("stop");
    await sleep(OUTAGE_MS);
    await pgCtl("start");
  })();
  await Promise.all([uploader(), uploader(), uploader(), uploader(), outage]);
  const until = Date.now() + 90_000;
  for (;;) {
    const c = await retrying(() => counts(p.session.id, versions));
    if (c.stored === todo.length && c.marked === todo.length) break;
    if (Date.now() > until || exited) throw new Error(`burst ${burst}: ${c.marked} of ${c.stored} marked; worker ${exited ?? "running"}\n${output}`);
    await sleep(200);
  }
  return waitingAtStop;
}

beforeAll(async () => {
  p = await makePractical("OUTAGE-T", { groups: GROUPS });
  worker = spawn(path.join(projectRoot, "node_modules", ".bin", "tsx"), ["scripts/worker.ts"], {
    cwd: projectRoot,
    env: { ...process.env, WORKER_CONCURRENCY: "4" },
    stdio: ["ignore", "pipe", "pipe"],
  });
  worker.stdout!.on("data", (d) => (output += d));
  worker.stderr!.on("data", (d) => (output += d));
  worker.on("exit", (code, signal) => (exited = `exited (${code ?? signal})`));
  const until = Date.now() + 60_000;
  while (!output.includes("worker running")) {
    if (exited || Date.now() > until) throw new Error(`the worker did not start: ${exited}\n${output}`);
    await sleep(100);
  }
}, 120_000);

afterAll(async () => {
  if (worker) await stopChild(worker);
  if (p) await retrying(() => p.course.destroy());
  await closeSequelize();
});

describe("job worker through PostgreSQL restarts", () => {
  test("two 4 s outages during marking bursts: every version marked exactly once, the worker never died", async () => {
    const waiting1 = await burstWithOutage(1);
    const waiting2 = await burstWithOutage(2);
    // the outages met work in progress (else the test proves nothing)
    expect(waiting1).toBeGreaterThan(0);
    expect(waiting2).toBeGreaterThan(0);

    const [rows] = await retrying(() =>
      sequelize.query("select version, status, marking_runs as runs from submissions where session_id = :id order by group_id, version", { replacements: { id: p.session.id } }),
    );
    const subs = rows as Array<{ version: number; status: string; runs: number }>;
    expect(subs).toHaveLength(2 * PER_BURST * GROUPS);
    expect(subs.filter((s) => s.status !== "marked" || s.runs !== 1)).toEqual([]);
    const [jobs] = await sequelize.query(
      `select count(*)::int as n from graphile_worker._private_jobs j join graphile_worker._private_tasks t on t.id = j.task_id
        where t.identifier = 'mark-submission' and (j.payload->>'submissionId')::int in (select id from submissions where session_id = :id)`,
      { replacements: { id: p.session.id } },
    );
    expect((jobs as Array<{ n: number }>)[0].n).toBe(0);

    expect(exited).toBeNull();
    // Node's footer when a rejection ends a process (the worker's guard logs the ones it caught)
    expect(output).not.toMatch(/^Node\.js v\d+\.\d+/m);
  }, 300_000);
});
