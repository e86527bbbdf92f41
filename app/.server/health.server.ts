// What a load balancer probes (GET /healthz, shape in shared/api.md): is the database answering,
// and how many jobs wait or have failed. No sign-in and no personal data. A database that does
// not answer within HEALTH_TIMEOUT_MS counts as down, so the probe itself never hangs.
import { getSequelize } from "./db/sequelize.server";

const HEALTH_TIMEOUT_MS = Number(process.env.HEALTH_TIMEOUT_MS ?? 2000);

export interface Health {
  ok: boolean;
  database: "up" | "down";
  queue: { waiting: number | null; failed: number | null };
}

function withTimeout<T>(work: Promise<T>, ms: number): Promise<T> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`no answer within ${ms} ms`)), ms);
  });
  return Promise.race([work, timeout]).finally(() => clearTimeout(timer));
}

export async function health(): Promise<Health> {
  try {
    // failed: no attempts left (graphile-worker keeps such jobs with their last error)
    const [rows] = await withTimeout(
      getSequelize().query(
        `select count(*) filter (where attempts < max_attempts)::int as waiting,
                count(*) filter (where attempts >= max_attempts)::int as failed
           from graphile_worker.jobs`,
      ),
      HEALTH_TIMEOUT_MS,
    );
    const { waiting, failed } = (rows as Array<{ waiting: number; failed: number }>)[0];
    return { ok: true, database: "up", queue: { waiting, failed } };
  } catch {
    return { ok: false, database: "down", queue: { waiting: null, failed: null } };
  }
}
