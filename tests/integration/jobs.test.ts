// The PostgreSQL job queue: a job added in a transaction exists only if that transaction
// commits, and running the queue sends the mail it asks for.
import { afterAll, describe, expect, test } from "vitest";
import { sequelize } from "~/.server/db/models.server";
import { enqueue } from "~/.server/jobs/queue.server";
import { pendingJobs, runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { waitForMail } from "./helpers";

afterAll(() => closeSequelize());

describe("job queue", () => {
  test("a rollback drops the job; a commit keeps it and the worker sends the mail", async () => {
    await runJobsUntilIdle();
    const before = (await pendingJobs()).length;
    await expect(
      sequelize.transaction(async (transaction) => {
        await enqueue("send-mail", { to: "rolled-back@demo.ratebook.invalid", subject: "never", text: "x" }, { transaction });
        expect((await pendingJobs()).length).toBe(before); // not visible outside the transaction
        throw new Error("roll back");
      }),
    ).rejects.toThrow("roll back");
    expect((await pendingJobs()).length).toBe(before);

    await sequelize.transaction(async (transaction) => {
      await enqueue("send-mail", { to: "queued@demo.ratebook.invalid", subject: "From the queue", text: "hello" }, { transaction });
    });
    const waiting = await pendingJobs();
    expect(waiting.map((j) => j.task)).toContain("send-mail");
    await runJobsUntilIdle();
    const [mail] = await waitForMail("queued@demo.ratebook.invalid");
    expect(mail.subject).toBe("From the queue");
    expect(await pendingJobs()).toEqual([]);
  });

  test("a malformed payload fails for good at once: not retried, and kept as a failed job (never vanishes)", async () => {
    await runJobsUntilIdle();
    await sequelize.query("select graphile_worker.add_job('send-mail', '{\"to\": \"not an address\"}'::json)");
    await runJobsUntilIdle();
    const failed = (await pendingJobs()).filter((j) => j.task === "send-mail");
    expect(failed).toHaveLength(1);
    expect(failed[0].attempts).toBe(1);
    expect(failed[0].lastError).toMatch(/permanent failure: payload is malformed/);
    const [rows] = await sequelize.query("select attempts, max_attempts from graphile_worker.jobs where id = :id", { replacements: { id: failed[0].id } });
    expect(rows).toEqual([{ attempts: 1, max_attempts: 1 }]);
    await sequelize.query("delete from graphile_worker._private_jobs where id = :id", { replacements: { id: failed[0].id } });
  });

  test("an address the forms refuse is not sent by the job either, and the job shows as failed", async () => {
    await runJobsUntilIdle();
    // Queued as raw job (as an old release or a bug might have): the job checks with the forms' function.
    await enqueue("send-mail", { to: "josé@uni.example", subject: "x", text: "y" });
    await runJobsUntilIdle();
    const failed = (await pendingJobs()).filter((j) => j.task === "send-mail");
    expect(failed).toHaveLength(1);
    expect(failed[0].lastError).toMatch(/permanent failure: not sent to "josé@uni.example": Use the address in plain characters/);
    await sequelize.query("delete from graphile_worker._private_jobs where id = :id", { replacements: { id: failed[0].id } });
  });
});
