// The admin page of the job queue: failed and waiting jobs listed, a failed job retried (attempts
// renewed, due now, audited), and only admins may do either.
import { afterAll, describe, expect, test } from "vitest";
import { action, loader } from "~/routes/admin/jobs";
import { getSequelize } from "~/.server/db/sequelize.server";
import { AuditEntry } from "~/.server/db/models.server";
import { call, demoCookie, payloadOf, request, statusOf } from "./helpers";

const KEYS = ["admin-jobs-failed", "admin-jobs-waiting"];

afterAll(async () => {
  await getSequelize().query("delete from graphile_worker._private_jobs where key = any($1::text[])", { bind: [KEYS] });
});

async function jobId(key: string): Promise<string> {
  const [rows] = await getSequelize().query("select id::text as id from graphile_worker._private_jobs where key = $1", { bind: [key] });
  return (rows as Array<{ id: string }>)[0].id;
}

describe("/admin/jobs", () => {
  test("lists a failed and a waiting job; an admin retries the failed one, which is audited", async () => {
    const sequelize = getSequelize();
    // a job for a task no worker runs here, due tomorrow: it stays where we put it
    await sequelize.query("select graphile_worker.add_job('admin-jobs-test', '{}'::json, run_at => now() + interval '1 day', max_attempts => 2, job_key => 'admin-jobs-failed')");
    await sequelize.query("select graphile_worker.add_job('admin-jobs-test', '{}'::json, run_at => now() + interval '1 day', job_key => 'admin-jobs-waiting')");
    await sequelize.query("update graphile_worker._private_jobs set attempts = 2, last_error = 'Error: the mail server said no\n    at stack' where key = 'admin-jobs-failed'");
    const failedId = await jobId("admin-jobs-failed");
    const waitingId = await jobId("admin-jobs-waiting");
    const admin = await demoCookie("admin");

    const page = payloadOf(await call(loader, request("/admin/jobs", { cookie: admin })));
    const failed = page.failed.find((j: { id: string }) => j.id === failedId);
    expect(failed).toMatchObject({ task: "admin-jobs-test", attempts: 2, maxAttempts: 2, state: "failed", lastError: "Error: the mail server said no" });
    expect(page.waiting.find((j: { id: string }) => j.id === waitingId)).toMatchObject({ state: "waiting", attempts: 0 });

    // a waiting job is not "failed": nothing to retry
    const notFailed = await call(action, request("/admin/jobs", { cookie: admin, form: { jobId: waitingId } }));
    expect(statusOf(notFailed)).toBe(404);

    const retried = await call(action, request("/admin/jobs", { cookie: admin, form: { jobId: failedId } }));
    expect(statusOf(retried)).toBe(200);
    expect(payloadOf(retried).message).toMatch(/will run again now/);
    const [rows] = await sequelize.query("select attempts, run_at <= now() as due from graphile_worker._private_jobs where key = 'admin-jobs-failed'");
    expect(rows).toEqual([{ attempts: 0, due: true }]);
    const after = payloadOf(await call(loader, request("/admin/jobs", { cookie: admin })));
    expect(after.failed.some((j: { id: string }) => j.id === failedId)).toBe(false);
    expect(await AuditEntry.count({ where: { action: "job.retried", entityType: "job", entityId: failedId } })).toBe(1);
    // push it back out of reach of any worker that runs in other tests
    await sequelize.query("update graphile_worker._private_jobs set run_at = now() + interval '1 day' where key = 'admin-jobs-failed'");
  });

  test("staff who are not admins get 403 on the page and the retry; an empty form is 400", async () => {
    const instructor = await demoCookie("instructor");
    expect(statusOf(await call(loader, request("/admin/jobs", { cookie: instructor })))).toBe(403);
    expect(statusOf(await call(action, request("/admin/jobs", { cookie: instructor, form: { jobId: "1" } })))).toBe(403);
    expect(statusOf(await call(action, request("/admin/jobs", { cookie: await demoCookie("admin"), form: {} })))).toBe(400);
  });
});
