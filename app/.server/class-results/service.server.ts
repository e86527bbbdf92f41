// Class results of a practical for its staff: the pooled Arrhenius fit over the benches' marking k
// (each group's latest version, when it is marked), beside the reaction system's reference, and
// the benches an instructor left out of the fit with a reason (table class_fit_exclusions,
// audited). The science is pure, in app/lib/gradebook/class-results.ts.
import { data } from "react-router";
import { UniqueConstraintError } from "sequelize";
import { z } from "zod";
import { getSequelize } from "../db/sequelize.server";
import { User } from "../db/models.server";
import { Bench } from "../db/lab-sessions.server";
import { ClassFitExclusion } from "../db/class-results.server";
import { sessionGradebook } from "../gradebook/session.server";
import { recordAudit } from "../audit.server";
import { requireSessionGradebook, type GradebookAt } from "../gradebook/access.server";
import { classResults, REASON_MAX, type ClassBenchInput, type ClassResults } from "~/lib/gradebook/class-results";

/** The form that leaves a bench out; the bench id is read with formId. */
export const excludeSchema = z.object({
  reason: z
    .string({ error: "Give a reason: it is shown beside the bench and kept in the audit log." })
    .trim()
    .min(1, { error: "Give a reason: it is shown beside the bench and kept in the audit log." })
    .max(REASON_MAX, { error: `Keep the reason to ${REASON_MAX} characters or fewer.` }),
});

function problem(message: string, status: 400 | 403 | 404 | 409, api: boolean): never {
  if (api) throw Response.json({ error: message }, { status });
  throw data({ message }, { status });
}

export interface ClassResultsAccess extends GradebookAt {
  sessionId: number;
}

/** Staff of the practical's course (instructors, demonstrators, admins), or 403/404: the gradebook's check. */
export async function classResultsAccess(user: User, sessionId: number, api = false): Promise<ClassResultsAccess> {
  return { sessionId, ...(await requireSessionGradebook(user, sessionId, api)) };
}

/** Instructors (and admins) only; a demonstrator gets 403. */
export async function requireClassResultsChange(user: User, sessionId: number, api = false): Promise<ClassResultsAccess> {
  const access = await classResultsAccess(user, sessionId, api);
  if (!access.instructor) problem("Only an instructor of the course leaves benches out of the class fit or puts them back.", 403, api);
  return access;
}

export interface ClassResultsView extends ClassResults {
  session: { id: number; courseId: number; courseCode: string; title: string; date: string; status: string };
  reaction: { name: string; kUnit: "1/s" | "L/(mol·s)"; orderA: number; orderB: number };
  /** whether the caller may leave benches out or put them back */
  canChange: boolean;
}

/** The class results as the page and the API show them (staff only: the caller checks). */
export async function classResultsView(access: ClassResultsAccess): Promise<ClassResultsView> {
  // The gradebook's rows: each group at a bench with its latest version (the one that counts).
  const book = await sessionGradebook(access.sessionId, access.version);
  const exclusions = await ClassFitExclusion.findAll({ where: { sessionId: access.sessionId }, include: [{ model: User, as: "excludedBy", attributes: ["displayName"] }] });
  const rows: ClassBenchInput[] = book!.rows.map((r) => ({
    benchId: r.benchId, bench: r.bench, group: r.group, temperatureC: r.temperatureC, submissionId: r.submissionId,
    status: r.status, k: r.k, kStdErr: r.kStdErr, kCI95: r.kCI95,
  }));
  const results = classResults(
    rows,
    { kRef: book!.reaction.kRef, TrefC: book!.reaction.TrefC, EaKJ: book!.reaction.EaKJ },
    exclusions.map((e) => ({ benchId: e.benchId, reason: e.reason, by: e.excludedBy?.displayName ?? null, at: e.createdAt.toISOString() })),
  );
  const { session, reaction } = book!;
  return {
    ...results,
    session: { id: session.id, courseId: session.courseId, courseCode: session.courseCode, title: session.title, date: session.date, status: session.status },
    reaction: { name: reaction.name, kUnit: reaction.kUnit, orderA: reaction.orderA, orderB: reaction.orderB },
    canChange: access.instructor,
  };
}

/** What a change gives back: done, or why not (the page shows it beside the form). */
export type ChangeOutcome = { ok: true; bench: string } | { ok: false; status: 400 | 404 | 409; message: string; field?: "reason" | "benchId" };

async function checkChange(access: ClassResultsAccess, benchId: number): Promise<{ ok: false; status: 404 | 409; message: string; field?: "benchId" } | { ok: true; bench: Bench }> {
  if (access.archived) return { ok: false, status: 409, message: "The course is archived, so its class results are read-only. Take it out of the archive first." };
  const bench = await Bench.findOne({ where: { id: benchId, sessionId: access.sessionId } });
  if (!bench) return { ok: false, status: 404, field: "benchId", message: "There is no such bench in this practical." };
  return { ok: true, bench };
}

/** Leaves a bench out of the class fit with a reason (1-500 characters); audited in the same transaction. */
export async function excludeBench(actor: User, access: ClassResultsAccess, benchId: number, reason: string): Promise<ChangeOutcome> {
  const why = reason.trim();
  if (!why) return { ok: false, status: 400, field: "reason", message: "Give a reason for leaving the bench out." };
  if (why.length > REASON_MAX) return { ok: false, status: 400, field: "reason", message: `Keep the reason to ${REASON_MAX} characters or fewer (it has ${why.length}).` };
  const checked = await checkChange(access, benchId);
  if (!checked.ok) return checked;
  const { bench } = checked;
  const already: ChangeOutcome = { ok: false, status: 409, field: "benchId", message: `Bench ${bench.label} is already left out of the fit.` };
  // The unique (session, bench) index refuses a second exclusion even when two arrive at once.
  return getSequelize().transaction(async (transaction): Promise<ChangeOutcome> => {
    const existing = await ClassFitExclusion.findOne({ where: { sessionId: access.sessionId, benchId }, transaction });
    if (existing) return already;
    const row = await ClassFitExclusion.create({ sessionId: access.sessionId, benchId, reason: why, excludedById: actor.id }, { transaction });
    await recordAudit(
      { actorId: actor.id, action: "class-fit.bench-excluded", entityType: "lab_session", entityId: access.sessionId, before: { bench: bench.label, inFit: true }, after: { bench: bench.label, benchId, inFit: false, reason: why, exclusionId: row.id } },
      transaction,
    );
    return { ok: true, bench: bench.label };
  }).catch((error: unknown) => {
    if (error instanceof UniqueConstraintError) return already;
    throw error;
  });
}

/** Puts a left-out bench back into the class fit; audited with the reason it had. */
export async function includeBench(actor: User, access: ClassResultsAccess, benchId: number): Promise<ChangeOutcome> {
  const checked = await checkChange(access, benchId);
  if (!checked.ok) return checked;
  const { bench } = checked;
  return getSequelize().transaction(async (transaction): Promise<ChangeOutcome> => {
    const existing = await ClassFitExclusion.findOne({ where: { sessionId: access.sessionId, benchId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!existing) return { ok: false, status: 409, field: "benchId", message: `Bench ${bench.label} is not left out of the fit.` };
    await existing.destroy({ transaction });
    await recordAudit(
      { actorId: actor.id, action: "class-fit.bench-included", entityType: "lab_session", entityId: access.sessionId, before: { bench: bench.label, benchId, inFit: false, reason: existing.reason, excludedAt: existing.createdAt.toISOString() }, after: { bench: bench.label, inFit: true } },
      transaction,
    );
    return { ok: true, bench: bench.label };
  });
}
