// A reset request answers the same for a known and an unknown address, does the same work for
// both (one password-reset job, no mail sent or queued inside the request, no account looked up),
// so neither the answer nor its time tells whether an account exists, and a mail outage cannot
// turn it into a 500: the mail is the worker's business (issue 15). Time itself is not measured
// here (speed belongs to benchmarks); the identical work is what keeps it equal.
import { afterAll, describe, expect, test } from "vitest";
import { action as forgotAction } from "~/routes/auth/password-forgot";
import { pendingJobs } from "~/.server/jobs/worker.server";
import { getSequelize, closeSequelize } from "~/.server/db/sequelize.server";
import { call, payloadOf, request, statusOf } from "./helpers";

afterAll(() => closeSequelize());

async function ask(email: string, peer: string) {
  const before = new Set((await pendingJobs()).map((j) => j.id));
  const queries: string[] = [];
  // Sequelize reads options.logging on every query; its typings leave `options` out
  const sequelize = getSequelize() as unknown as { options: { logging?: unknown } };
  const log = (sql: string) => queries.push(sql);
  const original = sequelize.options.logging;
  sequelize.options.logging = log;
  try {
    const res = await call(forgotAction, request("/password/forgot", { form: { email } }), {}, peer);
    const added = (await pendingJobs()).filter((j) => !before.has(j.id));
    return { status: statusOf(res), body: payloadOf(res), added: added.map((j) => j.task), queries };
  } finally {
    sequelize.options.logging = original;
  }
}

describe("password reset request", () => {
  test("known and unknown addresses: same answer, one password-reset job each, no account lookup, no mail in the request", async () => {
    const known = await ask("student1@demo.ratebook.invalid", `reset-known-${Date.now()}`);
    const unknown = await ask("nobody-here@demo.ratebook.invalid", `reset-unknown-${Date.now()}`);
    expect(known.status).toBe(200);
    expect(unknown.status).toBe(200);
    expect({ ...known.body, email: "" }).toEqual({ ...unknown.body, email: "" });
    expect(known.added).toEqual(["password-reset"]);
    expect(unknown.added).toEqual(["password-reset"]);
    // the request never reads users or auth tokens: the worker does
    for (const q of [...known.queries, ...unknown.queries]) expect(q).not.toMatch(/"users"|"auth_tokens"|\bfrom users\b/i);
    expect(known.queries.length).toBe(unknown.queries.length);
  });
});
