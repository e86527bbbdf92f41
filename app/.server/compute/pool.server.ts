// The compute pool: CPU-heavy work (tasks.server.ts: reading uploaded files, the engine's fits,
// gradebook workbooks) runs in worker threads, so one large upload or export never holds up the
// request thread and everyone else's requests. piscina 5.3.2; COMPUTE_THREADS threads
// (config.server.ts), made on first use and kept. Tasks queue when every thread is busy.
//
// The worker file: the production build has build/server/compute-worker.js beside the server
// bundle (react-router.config.ts builds it); from the sources (vitest, `react-router dev`, the
// scripts) it is worker.server.ts, loaded through tsx's loader, which the threads get in execArgv.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { threadId as ownThreadId } from "node:worker_threads";
import { Piscina } from "piscina";
import { computeThreadsFrom } from "../config.server";
import { Refusal } from "~/lib/readings/csv";
import { TASKS, type TaskInput, type TaskName, type TaskOutput } from "./tasks.server";

export type WorkerAnswer = { threadId: number; startedAt: number; endedAt: number } & (
  | { ok: true; value: unknown }
  | { ok: false; error: { name: string; message: string; stack?: string; refusal: boolean } }
);

/** One task that ran: where and when (epoch ms), for tests and benchmarks. */
export interface TaskRecord {
  task: TaskName;
  threadId: number;
  startedAt: number;
  endedAt: number;
}

const RECENT = 200;
const recent: TaskRecord[] = [];
let inFlight = 0;
let pool: Piscina | null = null;

export function computeThreads(): number {
  const { threads, problem } = computeThreadsFrom(process.env.COMPUTE_THREADS, os.availableParallelism());
  if (problem) throw new Error(problem);
  return threads;
}

function workerEntry(): { filename: string; execArgv: string[] } {
  const here = path.dirname(fileURLToPath(import.meta.url));
  const built = path.join(here, "compute-worker.js");
  if (fs.existsSync(built)) return { filename: built, execArgv: process.execArgv };
  const source = path.join(here, "worker.server.ts");
  if (fs.existsSync(source)) {
    const underTsx = process.execArgv.some((a) => a.includes("tsx"));
    return { filename: source, execArgv: underTsx ? process.execArgv : [...process.execArgv, "--import", "tsx"] };
  }
  throw new Error(`The compute pool's worker file is missing: neither ${built} (production build: run \`react-router build\`) nor ${source}.`);
}

function thePool(threads: number): Piscina {
  if (!pool) {
    const { filename, execArgv } = workerEntry();
    pool = new Piscina({ filename, execArgv, minThreads: threads, maxThreads: threads, idleTimeout: 60_000 });
  }
  return pool;
}

function remember(task: TaskName, answer: Pick<WorkerAnswer, "threadId" | "startedAt" | "endedAt">) {
  recent.push({ task, threadId: answer.threadId, startedAt: answer.startedAt, endedAt: answer.endedAt });
  if (recent.length > RECENT) recent.shift();
}

/** Runs a task in a worker thread (or here with COMPUTE_THREADS=0); throws what the task threw. */
export async function compute<T extends TaskName>(task: T, input: TaskInput<T>): Promise<TaskOutput<T>> {
  const threads = computeThreads();
  inFlight++;
  try {
    if (threads === 0) {
      const startedAt = Date.now();
      try {
        return (await (TASKS[task] as (i: unknown) => unknown)(input)) as TaskOutput<T>;
      } finally {
        remember(task, { threadId: ownThreadId, startedAt, endedAt: Date.now() });
      }
    }
    const answer = (await thePool(threads).run({ task, input })) as WorkerAnswer;
    remember(task, answer);
    if (answer.ok) return answer.value as TaskOutput<T>;
    const e = answer.error.refusal ? new Refusal(answer.error.message) : new Error(answer.error.message);
    if (!answer.error.refusal) e.name = answer.error.name;
    if (answer.error.stack) e.stack = answer.error.stack;
    throw e;
  } finally {
    inFlight--;
  }
}

/** The last tasks that ran (at most 200), oldest first, and how many run or wait now. */
export function computeActivity(): { recent: TaskRecord[]; inFlight: number; requestThreadId: number } {
  return { recent: recent.slice(), inFlight, requestThreadId: ownThreadId };
}

/** Stops the threads (a worker process shutting down; tests). The next task makes a new pool. */
export async function closeComputePool() {
  const p = pool;
  pool = null;
  await p?.destroy();
}
