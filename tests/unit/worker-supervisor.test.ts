// The job worker's supervisor: a runner that ends on its own (graphile-worker aborting its pool
// when the database restarts) is replaced, the jobs its workers held are unlocked first, and a
// database still away is waited for. Fakes stand in for graphile-worker and PostgreSQL.
import { describe, expect, it } from "vitest";
import { keepRunning, type RunnerLike } from "~/.server/jobs/supervisor.server";

class FakeRunner implements RunnerLike {
  promise: Promise<void>;
  settle!: (error?: Error) => void;
  stopped = false;
  constructor(public name: string) {
    this.promise = new Promise<void>((resolve, reject) => {
      this.settle = (error) => (error ? reject(error) : resolve());
    });
  }
  async stop() {
    this.stopped = true;
    this.settle();
  }
}

function harness(opts: { failStarts?: number; failUnlocks?: number } = {}) {
  const runners: FakeRunner[] = [];
  const unlocked: string[][] = [];
  const log: string[] = [];
  let starts = 0;
  let unlocks = 0;
  return {
    runners,
    unlocked,
    log,
    deps: {
      async start(ids: Set<string>) {
        starts++;
        if (starts > 1 && starts <= 1 + (opts.failStarts ?? 0)) throw new Error("connect ECONNREFUSED");
        const r = new FakeRunner(`r${runners.length + 1}`);
        ids.add(`${r.name}-w1`).add(`${r.name}-w2`);
        runners.push(r);
        return r;
      },
      async unlock(ids: string[]) {
        unlocks++;
        if (unlocks <= (opts.failUnlocks ?? 0)) throw new Error("the database system is starting up");
        unlocked.push(ids);
      },
      sleep: async () => undefined,
      log: (m: string) => log.push(m),
    },
  };
}

const settle = () => new Promise((r) => setTimeout(r, 0));

describe("keepRunning", () => {
  it("replaces a runner that aborted, after unlocking the jobs its workers held", async () => {
    const h = harness();
    const kept = await keepRunning(h.deps);
    expect(h.runners).toHaveLength(1);
    h.runners[0].settle(new Error("Could not failJobs; queue is in an inconsistent state; aborting."));
    await settle();
    expect(h.unlocked).toEqual([["r1-w1", "r1-w2"]]);
    expect(h.runners).toHaveLength(2);
    expect(kept.current()).toBe(h.runners[1]);
    expect(kept.restarts()).toBe(1);
    await kept.stop();
    expect(h.runners[1].stopped).toBe(true);
    expect(h.runners).toHaveLength(2); // a stop is not a failure: nothing is started after it
  });

  it("waits while the database is still away, then starts again", async () => {
    const h = harness({ failStarts: 3, failUnlocks: 2 });
    const kept = await keepRunning(h.deps);
    h.runners[0].settle(new Error("terminating connection due to administrator command"));
    for (let i = 0; i < 20; i++) await settle();
    expect(h.unlocked).toEqual([["r1-w1", "r1-w2"]]);
    expect(h.runners).toHaveLength(2);
    expect(h.log.filter((m) => m.includes("trying again"))).toHaveLength(5);
    await kept.stop();
  });

  it("a runner that ends without an error while not asked to stop is replaced too", async () => {
    const h = harness();
    const kept = await keepRunning(h.deps);
    h.runners[0].settle();
    await settle();
    expect(h.runners).toHaveLength(2);
    await kept.stop();
    await kept.promise;
  });

  it("a database missing at the first start is the caller's error", async () => {
    await expect(
      keepRunning({ ...harness().deps, start: async () => Promise.reject(new Error("connect ECONNREFUSED")) }),
    ).rejects.toThrow("ECONNREFUSED");
  });
});
