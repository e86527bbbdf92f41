// The compute pool's worker thread (piscina loads this file's default export; the production
// build bundles it to build/server/compute-worker.js, see react-router.config.ts). It runs one
// task of tasks.server.ts and answers with its value, or with what it threw: an error crossing
// threads would come back as a plain Error, so its class (a readings Refusal), name and message
// travel as data and pool.server.ts throws them again. (A workbook's bytes are copied back: a
// few MB take about a millisecond.)
import { threadId } from "node:worker_threads";
import { Refusal } from "~/lib/readings/csv";
import { TASKS, type TaskName } from "./tasks.server";
import type { WorkerAnswer } from "./pool.server";

const now = () => performance.timeOrigin + performance.now();

export default async function runTask({ task, input }: { task: TaskName; input: unknown }): Promise<WorkerAnswer> {
  const startedAt = now();
  try {
    const value = await (TASKS[task] as (input: unknown) => unknown)(input);
    return { ok: true, value, threadId, startedAt, endedAt: now() };
  } catch (error) {
    const e = error instanceof Error ? error : new Error(String(error));
    return { ok: false, error: { name: e.name, message: e.message, stack: e.stack, refusal: e instanceof Refusal }, threadId, startedAt, endedAt: now() };
  }
}
