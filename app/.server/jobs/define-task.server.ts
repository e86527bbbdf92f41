// One task = one file under tasks/: a name, a zod schema for its payload (jobs outlive deploys,
// so the payload is checked when it runs) and the work. List the file in tasks.server.ts.
import type { JobHelpers, Task } from "graphile-worker";
import type { z } from "zod";
import type { TaskName, TaskPayloads } from "./queue.server";

export interface TaskDefinition {
  name: string;
  run: Task;
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
      // A malformed payload will never succeed: fail loudly once rather than retry 25 times.
      if (!parsed.success) {
        helpers.logger.error(`payload of job ${helpers.job.id} is malformed: ${parsed.error.message}; dropped`);
        return;
      }
      await work(parsed.data, helpers);
    },
  };
}
