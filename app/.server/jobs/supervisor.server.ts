// Keeps a job-queue worker running through a database restart. graphile-worker 0.17.3 aborts its
// whole pool when it cannot record a job's end (its batch retry rethrows on the first failure),
// and the jobs the pool held stay locked for hours. So when a runner ends without being asked to,
// we unlock the jobs its workers held (marking is idempotent: a version is marked only while
// still queued) and start a new runner, waiting with backoff while the database is away.
// Pure: the runner, the unlock and the clock are passed in, so a unit test can drive it.

export interface RunnerLike {
  promise: Promise<void>;
  stop(): Promise<void>;
}

export interface SupervisorDeps<R extends RunnerLike> {
  /** starts a runner; `workerIds` collects the ids of the workers it creates */
  start(workerIds: Set<string>): Promise<R>;
  /** frees the jobs those workers held (graphile_worker.force_unlock_workers) */
  unlock(workerIds: string[]): Promise<void>;
  sleep(ms: number): Promise<void>;
  log(message: string): void;
}

export interface KeptWorker<R extends RunnerLike> {
  /** the runner working now (null between a failure and its replacement) */
  current(): R | null;
  /** how many times a runner was replaced */
  restarts(): number;
  stop(): Promise<void>;
  /** settles once stop() has finished */
  promise: Promise<void>;
}

const backoff = (attempt: number) => Math.min(5000, 200 * 1.5 ** attempt);

export async function keepRunning<R extends RunnerLike>(deps: SupervisorDeps<R>): Promise<KeptWorker<R>> {
  let stopping = false;
  let current: R | null = null;
  let restarts = 0;
  let ids = new Set<string>();
  // The first start is the caller's: a database that is not there at start-up is an error to see.
  current = await deps.start(ids);

  async function retry(what: string, work: () => Promise<void>) {
    for (let attempt = 0; !stopping; attempt++) {
      try {
        await work();
        return;
      } catch (error) {
        deps.log(`[jobs] ${what} failed (${(error as Error).message}); trying again`);
        await deps.sleep(backoff(attempt));
      }
    }
  }

  const promise = (async () => {
    for (;;) {
      try {
        await current!.promise;
      } catch (error) {
        if (!stopping) deps.log(`[jobs] the worker stopped: ${(error as Error).message}`);
      }
      if (stopping) return;
      current = null;
      const held = [...ids];
      ids = new Set<string>();
      if (held.length) await retry("unlocking the stopped worker's jobs", () => deps.unlock(held));
      await retry("starting the worker again", async () => {
        current = await deps.start(ids);
      });
      if (stopping) {
        await (current as R | null)?.stop().catch(() => undefined);
        return;
      }
      restarts++;
      deps.log("[jobs] worker running again");
    }
  })();

  return {
    current: () => current,
    restarts: () => restarts,
    async stop() {
      stopping = true;
      await current?.stop().catch(() => undefined);
      await promise;
    },
    promise,
  };
}
