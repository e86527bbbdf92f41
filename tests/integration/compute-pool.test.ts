// The compute pool (app/.server/compute/): heavy upload previews, the marking job's fit, /api/fit
// and gradebook downloads run in worker threads, and the request thread keeps answering while
// they run. Behaviour only (which thread, what answered while a fit ran), no timing thresholds:
// the machine is shared. COMPUTE_THREADS=0 (the work on the request thread, as before the pool)
// is the control that shows the test can tell the difference.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as previewAction } from "~/routes/api/submission-preview";
import { action as uploadAction } from "~/routes/api/group-submissions";
import { action as fitAction } from "~/routes/api/fit";
import { loader as meLoader } from "~/routes/api/me";
import { loader as courseXlsx } from "~/routes/courses/export-xlsx";
import { closeComputePool, compute, computeActivity, type TaskRecord } from "~/.server/compute/pool.server";
import { runCsv, simulateRun } from "~/lib/marking/simulate";
import { Submission } from "~/.server/db/submissions.server";
import { call, request } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";

const BASE = "http://127.0.0.1:3100";
const GROUPS = 4;
const ROWS = 20_000; // a heavy preview: about 0.3 s of reading and fitting on this machine
let p: Practical;
const cookies: string[] = [];
let instructorCookie = "";
const csvOf = (i: number) => {
  const bench = p.benches[i];
  // readings from the integrated rate law of A + B, first order in each (textbook form, in the
  // engine's closed forms), at the bench's Arrhenius k, with 0.8 % noise
  return runCsv(simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: ROWS, seed: 40 + i }));
};

beforeAll(async () => {
  process.env.COMPUTE_THREADS = "2";
  p = await makePractical("POOL-T", { groups: GROUPS });
  for (const s of p.students) cookies.push(await p.cookie(s));
  instructorCookie = await p.cookie(p.instructor);
}, 60_000);

afterAll(async () => {
  delete process.env.COMPUTE_THREADS;
  await closeComputePool();
});

interface Answer {
  status: number;
  startedAt: number;
  endedAt: number;
}

/** A burst of heavy previews (one per group) while one client asks /api/me again and again until they are done. */
async function burstWithMe(csvs: string[]) {
  const before = computeActivity().recent.length;
  let done = false;
  const previews = Promise.all(
    csvs.map((csv, i) =>
      call(previewAction, uploadRequest(`/api/groups/${p.groups[i].id}/submissions/preview`, cookies[i], { bytes: csv, name: `heavy-${i}.csv` }), { groupId: String(p.groups[i].id) }),
    ),
  ).finally(() => (done = true));
  const me: Answer[] = [];
  const asking = (async () => {
    while (!done) {
      const startedAt = Date.now();
      const res: Response = await call(meLoader, request("/api/me", { cookie: instructorCookie }));
      me.push({ status: res.status, startedAt, endedAt: Date.now() });
    }
  })();
  const answers: Response[] = await previews;
  await asking;
  const tasks = computeActivity().recent.slice(before).filter((t) => t.task === "preview");
  return { answers, me, tasks };
}

/** /api/me answers that began and ended while a preview task was running. */
const answeredDuring = (me: Answer[], tasks: TaskRecord[]) => me.filter((a) => tasks.some((t) => a.startedAt > t.startedAt && a.endedAt < t.endedAt));

describe("compute pool", () => {
  test("heavy previews run in worker threads, and /api/me answers while they run", async () => {
    const csvs = p.benches.map((_, i) => csvOf(i));
    const { answers, me, tasks } = await burstWithMe(csvs);
    for (const res of answers) expect(res.status).toBe(200);
    const bodies = await Promise.all(answers.map((r) => r.json()));
    for (const [i, b] of bodies.entries()) {
      expect(b.n).toBe(ROWS);
      expect(b.refused).toBeNull();
      // the fit recovers the bench's k (readings made from it; 0.8 % noise over 20,000 rows)
      expect(Math.abs(b.fit.k / p.kAt(p.benches[i]) - 1)).toBeLessThan(0.02);
    }
    // every preview's reading and fit ran in a pool thread, not on the request thread
    expect(tasks).toHaveLength(GROUPS);
    const own = computeActivity().requestThreadId;
    for (const t of tasks) expect(t.threadId).not.toBe(own);
    expect(new Set(tasks.map((t) => t.threadId)).size).toBe(2); // both threads worked
    // the request thread answered /api/me, signed in, while fits were in progress
    expect(me.every((a) => a.status === 200)).toBe(true);
    expect(answeredDuring(me, tasks).length).toBeGreaterThan(0);
  }, 120_000);

  test("control: with COMPUTE_THREADS=0 the fits hold the request thread and no /api/me answers during one", async () => {
    process.env.COMPUTE_THREADS = "0";
    try {
      const { answers, me, tasks } = await burstWithMe(p.benches.slice(0, 2).map((_, i) => csvOf(i)));
      for (const res of answers) expect(res.status).toBe(200);
      expect(tasks).toHaveLength(2);
      for (const t of tasks) expect(t.threadId).toBe(computeActivity().requestThreadId);
      expect(me.length).toBeGreaterThan(0);
      expect(answeredDuring(me, tasks)).toEqual([]);
    } finally {
      process.env.COMPUTE_THREADS = "2";
    }
  }, 120_000);

  test("an upload's reading and its marking job's fit run in pool threads; /api/fit and a workbook too", async () => {
    const before = computeActivity().recent.length;
    const bench = p.benches[0];
    const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: 30, seed: 7 });
    const res: Response = await call(uploadAction, uploadRequest(`/api/groups/${p.groups[0].id}/submissions`, cookies[0], { bytes: runCsv(run), name: "run.csv" }, { reportedK: String(run.reportedK), reportedMethod: run.reportedMethod }), { groupId: String(p.groups[0].id) });
    expect(res.status).toBe(202);
    const { id } = await res.json();
    await runJobsUntilIdle();
    const s = await Submission.findByPk(id);
    expect(s!.status).toBe("marked");

    const fit: Response = await call(fitAction, new Request(`${BASE}/api/fit`, {
      method: "POST",
      headers: { Cookie: instructorCookie, Origin: BASE, "Content-Type": "application/json" },
      body: JSON.stringify({
        reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, units: { time: "s", concentration: "mol/L" },
        measurement: { kind: "concentrationA" }, points: run.rows, temperatureC: bench.temperatureC,
      }),
    }));
    expect(fit.status).toBe(200);
    const book: Response = await call(courseXlsx, request(`/courses/${p.course.id}/export.xlsx`, { cookie: instructorCookie }), { courseId: String(p.course.id) });
    expect(book.status).toBe(200);
    expect(new Uint8Array(await book.arrayBuffer()).slice(0, 2)).toEqual(new Uint8Array([0x50, 0x4b])); // a zip: PK
    const ran = computeActivity().recent.slice(before);
    expect(ran.map((t) => t.task).sort()).toEqual(["exportFile", "fit", "mark", "parse"]);
    for (const t of ran) expect(t.threadId).not.toBe(computeActivity().requestThreadId);
  }, 120_000);

  test("an error thrown in a worker comes back with the same name and message as on the request thread", async () => {
    // a pooled Arrhenius fit of two runs: the engine refuses it (3 are needed); validation is skipped on purpose
    const bad = { kind: "arrhenius", request: { arrhenius: { benches: [{ k: 0.1, temperatureC: 25 }, { k: 0.2, temperatureC: 35 }] } } } as never;
    const inPool = await compute("fit", bad).then(() => null, (e: Error) => e);
    process.env.COMPUTE_THREADS = "0";
    const here = await compute("fit", bad).then(() => null, (e: Error) => e).finally(() => (process.env.COMPUTE_THREADS = "2"));
    expect(here).toBeInstanceOf(Error);
    expect(inPool).toBeInstanceOf(Error);
    expect({ name: inPool!.name, message: inPool!.message }).toEqual({ name: here!.name, message: here!.message });
  }, 60_000);
});
