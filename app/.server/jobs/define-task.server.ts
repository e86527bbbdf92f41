// One task = one file under tasks/: a name, a zod schema for its payload (jobs outlive deploys,
// so the payload is checked when it runs) and the work. List the file in tasks.server.ts.
import type { JobHelpers, Task } from "graphile-worker";
import type { z } from "zod";
import type { TaskName, TaskPayloads } from "./queue.server";

export interface TaskDefinition {
  name: string;
  run: Task;
}

/** A job that can never succeed (bad payload, unsendable address): failed at once, not retried. */
export class PermanentJobError extends Error {}

export const PERMANENT_FAILURE = "permanent failure";

/**
 * Ends the job as failed for good: its attempts are used up, so graphile-worker keeps it (with
 * the message as `last_error`) instead of retrying or deleting it. Jobs never vanish silently.
 */
async function failForGood(helpers: JobHelpers, message: string): Promise<never> {
  helpers.logger.error(`job ${helpers.job.id} (${helpers.job.task_identifier}) failed for good: ${message}`);
  await helpers.withPgClient((client) =>
    client.query("update graphile_worker._private_jobs set max_attempts = greatest(attempts, 1) where id = $1", [helpers.job.id]),
  );
  throw new Error(`${PERMANENT_FAILURE}: ${message}`);
}

export function defineTask<T extends TaskName>(
  name: T,
  schema: z.ZodType<TaskPayloads[T]>,
  work: (payload: TaskPayloads[T], helpers: JobHelpers) => Promise<void>,
): TaskDefinition {
  return {
    name,
    run: async (raw, helpers) => {
      const parsed = schema.safeParse(raw);
      if (!parsed.success) return failForGood(helpers, `payload is malformed: ${parsed.error.issues.map((i) => `${i.path.join(".") || "(payload)"} ${i.message}`).join("; ")}`);
      try {
        await work(parsed.data, helpers);
      } catch (error) {
        if (error instanceof PermanentJobError) return failForGood(helpers, error.message);
        throw error;
      }
    },
  };
}
