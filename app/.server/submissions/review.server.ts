// What reviewers do with a practical's submissions: the queue (to check, flagged, checked), leave
// out a reading (with a reason; the mark is recomputed), override a mark (reason required), comment,
// mark as checked, and release the practical's marks (each group is e-mailed through the queue).
import { data } from "react-router";
import { Op } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import type { User } from "../db/models.server";
import { Group, GroupMember } from "../db/groups.server";
import { LabSession } from "../db/lab-sessions.server";
import { Submission, SubmissionComment, effectiveMark, type Exclusion } from "../db/submissions.server";
import { recordAudit } from "../audit.server";
import { queueScoresToPlatform } from "../lti/grades.server";
import { queueMail } from "../mail/outbox.server";
import { benchesOfSession, markingContext, practicalOfSubmission } from "./context.server";
import { computeMark, markColumns } from "./marking.server";
import { flaggedWords, type QueueStop } from "~/lib/marking/queue";
import { CORRECTION_KINDS, correctionText, type Correction, type CorrectionKind } from "~/lib/marking/corrections";
import { CONCENTRATION_UNITS, TIME_UNITS } from "~/lib/kinetics/units";
import { SubmissionFile } from "../db/submissions.server";
import { compute } from "../compute/pool.server";

export type QueueTab = "to-check" | "flagged" | "checked";

function problem(message: string, status: 400 | 404 | 409 = 400): never {
  throw data({ message }, { status });
}

/** Flagged: the engine raised a flag, marking failed, or the file was refused; checked: a reviewer said so. */
export function queueTabOf(s: Pick<Submission, "reviewState" | "status" | "flags">): QueueTab {
  if (s.reviewState === "checked") return "checked";
  if (s.status === "failed" || s.status === "refused" || (s.flags ?? []).length > 0) return "flagged";
  return "to-check";
}

export interface QueueRow {
  groupId: number;
  group: string;
  bench: string;
  CA0: number;
  CB0: number;
  temperatureC: number;
  latest: {
    id: number; version: number; status: string; late: boolean; submittedAt: string; mark: number | null; overridden: boolean;
    flags: string[]; tab: QueueTab; markingError: string | null; k: number | null; deviationPct: number | null;
    /** why it is flagged, a word per reason (empty when it is not) */
    words: string[];
  } | null;
  versions: number;
}

export async function reviewQueue(session: LabSession): Promise<{ rows: QueueRow[]; counts: Record<QueueTab | "none", number> }> {
  const benches = await benchesOfSession(session.id);
  const subs = await Submission.findAll({
    where: { sessionId: session.id },
    attributes: ["id", "groupId", "version", "status", "late", "submittedAt", "autoMark", "overrideMark", "flags", "reviewState", "markingError", "checks"],
    order: [["groupId", "ASC"], ["version", "DESC"]],
  });
  const byGroup = new Map<number, Submission[]>();
  for (const s of subs) byGroup.set(s.groupId, [...(byGroup.get(s.groupId) ?? []), s]);
  const counts = { "to-check": 0, flagged: 0, checked: 0, none: 0 };
  const rows: QueueRow[] = benches.map((b) => {
    const list = byGroup.get(b.groupId!) ?? [];
    const s = list[0];
    const tab = s ? queueTabOf(s) : null;
    counts[tab ?? "none"]++;
    return {
      groupId: b.groupId!,
      group: b.group?.name ?? `group ${b.groupId}`,
      bench: b.label,
      CA0: b.CA0,
      CB0: b.CB0,
      temperatureC: b.temperatureC,
      versions: list.length,
      latest: s
        ? {
            id: s.id, version: s.version, status: s.status, late: s.late, submittedAt: s.submittedAt.toISOString(),
            mark: effectiveMark(s), overridden: s.overrideMark !== null, flags: (s.flags ?? []).map((f) => f.code), tab: tab!,
            markingError: s.markingError, k: s.checks?.kMarking ?? null, deviationPct: s.checks?.experiment.deviationPct ?? null,
            words: flaggedWords(s.status, (s.flags ?? []).map((f) => f.code)),
          }
        : null,
    };
  });
  return { rows, counts };
}

/** The queue as stops in bench order (each group's latest version), for previous / next flagged. */
export function queueStops(rows: readonly QueueRow[]): QueueStop[] {
  return rows.filter((r) => r.latest).map((r) => ({ id: r.latest!.id, group: r.group, flagged: r.latest!.tab === "flagged" }));
}

/**
 * "Mark all unflagged as checked": the versions of `ids` (what the reviewer was shown and counted)
 * that are still the group's latest, marked, unflagged and not checked are marked checked, each
 * audited, in one transaction. Returns how many changed (a version flagged meanwhile is left).
 */
export async function checkUnflagged(actor: User, session: LabSession, ids: readonly number[]): Promise<{ changed: number; skipped: number }> {
  const { rows } = await reviewQueue(session);
  const eligible = new Set(rows.filter((r) => r.latest && r.latest.tab === "to-check" && r.latest.status === "marked").map((r) => r.latest!.id));
  const chosen = [...new Set(ids)].filter((id) => eligible.has(id));
  await getSequelize().transaction(async (transaction) => {
    if (!chosen.length) return;
    await Submission.update({ reviewState: "checked", reviewedById: actor.id }, { where: { id: { [Op.in]: chosen }, sessionId: session.id, reviewState: "to-check" }, transaction });
    for (const id of chosen) {
      await recordAudit({ actorId: actor.id, action: "submission.checked", entityType: "submission", entityId: id, after: { bulk: true } }, transaction);
    }
  });
  return { changed: chosen.length, skipped: new Set(ids).size - chosen.length };
}

/**
 * After release a changed mark goes to the learning platform again (once: only a score whose mark
 * differs from the one sent waits). Read after the commit, as the gradebook reads committed rows.
 */
async function markChangedAfterCommit(submission: Submission) {
  const session = await LabSession.findByPk(submission.sessionId, { attributes: ["id", "courseId"] });
  if (session) await queueScoresToPlatform(session);
}

/** Leaves one reading out (by its row in the file), with a reason; the mark is recomputed at once. */
export async function excludeReading(actor: User, submission: Submission, row: number, reason: string) {
  const why = reason.trim();
  if (!why) problem("Give a reason for leaving the reading out.");
  if (!submission.readings) problem("This version has no readings to leave out.", 409);
  if (!submission.readings.rowNumbers.includes(row)) problem(`Row ${row} is not one of this file's readings.`);
  if (submission.excluded.some((e) => e.row === row)) problem(`Row ${row} is already left out.`, 409);
  await getSequelize().transaction(async (transaction) => {
    const before = { excluded: submission.excluded, autoMark: submission.autoMark };
    const excluded: Exclusion[] = [...submission.excluded, { row, reason: why.slice(0, 500), byId: actor.id, at: new Date().toISOString() }];
    submission.excluded = excluded;
    const cols = markColumns(await computeMark(submission));
    await submission.update({ ...cols, excluded, markedAt: new Date() }, { transaction });
    await recordAudit({ actorId: actor.id, action: "submission.reading-excluded", entityType: "submission", entityId: submission.id, before, after: { excluded, autoMark: cols.autoMark, reason: why } }, transaction);
  });
  await markChangedAfterCommit(submission);
}

/** Marks a failed version again (after the practical's settings or the engine were put right); audited. */
export async function markAgain(actor: User, submission: Submission) {
  if (submission.status !== "failed") problem("Only a version whose marking failed can be marked again.", 409);
  await getSequelize().transaction(async (transaction) => {
    const before = { status: submission.status, markingError: submission.markingError };
    const cols = markColumns(await computeMark(submission));
    await submission.update({ ...cols, markedAt: new Date(), markingRuns: submission.markingRuns + 1 }, { transaction });
    await recordAudit({ actorId: actor.id, action: "submission.marked-again", entityType: "submission", entityId: submission.id, before, after: { status: cols.status, markingError: cols.markingError, autoMark: cols.autoMark } }, transaction);
  });
}

/** A reviewer chooses the version that counts in the gradebook (or, with choose false, takes the choice back); audited. */
export async function chooseCountingVersion(actor: User, submission: Submission, choose: boolean) {
  if (choose && submission.status !== "marked" && submission.overrideMark === null) problem("Only a marked version (or one with a reviewer's mark) can count.", 409);
  await getSequelize().transaction(async (transaction) => {
    const [rows] = await getSequelize().query("select id from submissions where session_id = :sessionId and group_id = :groupId and counts_chosen", { replacements: { sessionId: submission.sessionId, groupId: submission.groupId }, transaction });
    const before = { chosen: (rows as Array<{ id: number }>).map((r) => r.id) };
    await Submission.update({ countsChosen: false }, { where: { sessionId: submission.sessionId, groupId: submission.groupId, countsChosen: true }, transaction });
    if (choose) await Submission.update({ countsChosen: true }, { where: { id: submission.id }, transaction });
    await recordAudit({ actorId: actor.id, action: choose ? "submission.chosen-to-count" : "submission.choice-to-count-removed", entityType: "submission", entityId: submission.id, before, after: { chosen: choose ? [submission.id] : [] } }, transaction);
  });
}

export interface CorrectionInput {
  kind: string;
  /** the unit, the file row, or "time letter,value letter" for columns (ignored for a swap) */
  to: string;
  reason: string;
}

/**
 * Re-marks a version with a reviewer's stated correction: the corrected unit, columns (read again
 * from the original file, which stays as it was) or reading left out goes into the stored fields,
 * the correction is kept with the version, the engine marks it again, the practical's policy
 * prices it, the group's feedback says so, and the audit log has before and after.
 */
export async function correctSubmission(actor: User, submission: Submission, input: CorrectionInput): Promise<Correction> {
  const kind = input.kind as CorrectionKind;
  if (!(CORRECTION_KINDS as readonly string[]).includes(kind)) problem(`Choose what to correct: ${CORRECTION_KINDS.join(", ")}.`);
  const why = input.reason.trim();
  if (!why) problem("Say why (the group reads it in their feedback, and it is kept in the audit log).");
  if (submission.status !== "marked" && submission.status !== "failed") problem("Only a version that was marked (or that marking refused) can be corrected.", 409);
  if (!submission.readings) problem("This version has no readings to correct.", 409);
  const to = input.to.trim();
  const readings = submission.readings;
  const changes: Partial<Pick<Submission, "timeUnit" | "concentrationUnit" | "readings" | "timeColumn" | "valueColumn" | "excluded">> = {};
  let from = "";
  let toText = to;
  switch (kind) {
    case "concentration-unit":
      if (!(CONCENTRATION_UNITS as readonly string[]).includes(to)) problem(`The concentration unit must be one of ${CONCENTRATION_UNITS.join(", ")}.`);
      if (to === submission.concentrationUnit) problem(`The readings are already taken as ${to}.`, 409);
      from = submission.concentrationUnit;
      changes.concentrationUnit = to;
      break;
    case "time-unit":
      if (!(TIME_UNITS as readonly string[]).includes(to)) problem(`The time unit must be one of ${TIME_UNITS.join(", ")}.`);
      if (to === submission.timeUnit) problem(`The times are already taken as ${to}.`, 409);
      from = submission.timeUnit;
      changes.timeUnit = to;
      break;
    case "swapped-columns":
    case "columns": {
      const letters = kind === "swapped-columns" ? [readings.value.letter, readings.time.letter] : to.toUpperCase().split(/[\s,;]+/).filter(Boolean);
      if (letters.length !== 2 || letters.some((l) => !/^[A-Z]{1,3}$/.test(l))) problem("Give the time column and the value column as two column letters, e.g. \"B, C\".");
      if (letters[0] === letters[1]) problem("The time and value columns must be two different columns.");
      if (letters[0] === readings.time.letter && letters[1] === readings.value.letter) problem(`Column ${letters[0]} is already the time and ${letters[1]} the value.`, 409);
      const file = await SubmissionFile.findByPk(submission.id);
      if (!file) problem("The original file of this version is missing, so its columns cannot be read again.", 409);
      const practical = await practicalOfSubmission(submission.sessionId, submission.benchId, submission.groupId);
      if (!practical) problem("The group's bench in this practical no longer exists, so the file cannot be read again.", 409);
      // read and range-checked in the compute pool as an upload is, so a refusal reads the same
      const parsed = await compute("parse", {
        file: { bytes: new Uint8Array(file.bytes), name: file.originalName, type: file.contentType, size: file.size },
        choices: { timeColumn: letters[0], valueColumn: letters[1], measured: submission.measured === "concentrationA" ? "concentrationA" : "session", timeUnit: submission.timeUnit as never, concentrationUnit: submission.concentrationUnit as never, reportedK: null, reportedMethod: null, sessionId: null, startTime: null },
        measured: practical.system.measured,
        ctx: markingContext(practical),
      });
      if (!parsed.ok) problem(`With time in column ${letters[0]} and the value in column ${letters[1]}, the file cannot be read: ${parsed.message}`);
      from = `${readings.time.letter}, ${readings.value.letter}`;
      toText = `${letters[0]}, ${letters[1]}`;
      changes.readings = parsed.readings;
      changes.timeColumn = letters[0];
      changes.valueColumn = letters[1];
      // rows left out stay left out where the file still has them
      changes.excluded = submission.excluded.filter((e) => parsed.readings.rowNumbers.includes(e.row));
      break;
    }
    case "reading-left-out": {
      const row = Number(to);
      if (!Number.isInteger(row) || !readings.rowNumbers.includes(row)) problem(`Row ${to || "?"} is not one of this file's readings; give its row number in the file.`);
      if (submission.excluded.some((e) => e.row === row)) problem(`Row ${row} is already left out.`, 409);
      from = String(row);
      toText = String(row);
      changes.excluded = [...submission.excluded, { row, reason: why.slice(0, 500), byId: actor.id, at: new Date().toISOString() }];
      break;
    }
  }
  const correction: Correction = { kind, from, to: toText, reason: why.slice(0, 500), byId: actor.id, at: new Date().toISOString() };
  await getSequelize().transaction(async (transaction) => {
    const before = { autoMark: submission.autoMark, status: submission.status, timeUnit: submission.timeUnit, concentrationUnit: submission.concentrationUnit, columns: `${readings.time.letter}, ${readings.value.letter}`, excluded: submission.excluded.map((e) => e.row), corrections: submission.corrections };
    Object.assign(submission, changes);
    submission.corrections = [...(submission.corrections ?? []), correction];
    const cols = markColumns(await computeMark(submission));
    await submission.update({ ...changes, corrections: submission.corrections, ...cols, markedAt: new Date() }, { transaction });
    await recordAudit({ actorId: actor.id, action: "submission.corrected", entityType: "submission", entityId: submission.id, before, after: { correction, text: correctionText(correction), autoMark: cols.autoMark, status: cols.status, cost: (cols.checks as { correction?: unknown } | null)?.correction ?? null } }, transaction);
  });
  return correction;
}

/** Puts a left-out reading back; the mark is recomputed. */
export async function includeReading(actor: User, submission: Submission, row: number) {
  if (!submission.excluded.some((e) => e.row === row)) problem(`Row ${row} is not left out.`, 409);
  await getSequelize().transaction(async (transaction) => {
    const before = { excluded: submission.excluded, autoMark: submission.autoMark };
    submission.excluded = submission.excluded.filter((e) => e.row !== row);
    // a correction that left this reading out no longer holds (nor costs)
    submission.corrections = (submission.corrections ?? []).filter((c) => !(c.kind === "reading-left-out" && c.to === String(row)));
    const cols = markColumns(await computeMark(submission));
    await submission.update({ ...cols, excluded: submission.excluded, corrections: submission.corrections, markedAt: new Date() }, { transaction });
    await recordAudit({ actorId: actor.id, action: "submission.reading-included", entityType: "submission", entityId: submission.id, before, after: { excluded: submission.excluded, autoMark: cols.autoMark } }, transaction);
  });
  await markChangedAfterCommit(submission);
}

/** Sets (or, with mark null, removes) a reviewer's mark; the reason is required and audited with before and after. */
export async function overrideMark(actor: User, submission: Submission, mark: number | null, reason: string) {
  const why = reason.trim();
  if (!why) problem("Give a reason for the override: it is kept in the audit log.");
  if (mark !== null && !(Number.isFinite(mark) && mark >= 0 && mark <= 100)) problem("The mark must be a number from 0 to 100 (percent).");
  await getSequelize().transaction(async (transaction) => {
    const before = { mark: effectiveMark(submission), overrideMark: submission.overrideMark, overrideReason: submission.overrideReason };
    await submission.update({ overrideMark: mark, overrideReason: mark === null ? null : why.slice(0, 1000) }, { transaction });
    await recordAudit({ actorId: actor.id, action: mark === null ? "submission.override-removed" : "submission.mark-overridden", entityType: "submission", entityId: submission.id, before, after: { mark: effectiveMark(submission), overrideMark: mark, reason: why } }, transaction);
  });
  await markChangedAfterCommit(submission);
}

export async function addComment(actor: User, submission: Submission, body: string) {
  const text = body.trim();
  if (!text) problem("Write a comment first.");
  await SubmissionComment.create({ submissionId: submission.id, authorId: actor.id, body: text.slice(0, 4000) });
}

export async function setReviewState(actor: User, submission: Submission, state: "to-check" | "checked") {
  await getSequelize().transaction(async (transaction) => {
    await submission.update({ reviewState: state, reviewedById: state === "checked" ? actor.id : null }, { transaction });
    await recordAudit({ actorId: actor.id, action: `submission.${state === "checked" ? "checked" : "unchecked"}`, entityType: "submission", entityId: submission.id }, transaction);
  });
}

export async function releaseInfo(sessionId: number): Promise<{ releasedAt: Date | null; showsReference: boolean }> {
  const [rows] = await getSequelize().query("select marks_released_at as \"releasedAt\", release_shows_reference as \"showsReference\" from lab_sessions where id = :id", { replacements: { id: sessionId } });
  const r = (rows as Array<{ releasedAt: Date | null; showsReference: boolean }>)[0];
  return r ?? { releasedAt: null, showsReference: false };
}

/**
 * Versions still "queued" whose marking job will never run again (it used up its attempts, or is
 * gone) become "failed" with the job's last error, so no version waits for ever: not before
 * release (which would refuse for ever) and not after (the group would see "being marked").
 * A job that is waiting or running is left alone.
 */
export async function settleStoppedMarking(sessionId: number): Promise<number> {
  const [rows] = await getSequelize().query(
    `select s.id, j.last_error as "lastError", (j.id is null) as gone
       from submissions s
       left join lateral (
         select j.id, j.attempts, j.max_attempts, j.last_error
           from graphile_worker._private_jobs j join graphile_worker._private_tasks t on t.id = j.task_id
          where t.identifier = 'mark-submission' and (j.payload->>'submissionId')::int = s.id
          order by j.id desc limit 1
       ) j on true
      where s.session_id = :sessionId and s.status = 'queued' and (j.id is null or j.attempts >= j.max_attempts)`,
    { replacements: { sessionId } },
  );
  let settled = 0;
  for (const r of rows as Array<{ id: number; lastError: string | null; gone: boolean }>) {
    const why = r.gone ? "its marking job is gone" : `its marking job stopped after its last try (${(r.lastError ?? "no error recorded").slice(0, 200)})`;
    const [n] = await Submission.update(
      { status: "failed", markingError: `This version could not be marked: ${why}. Staff can mark it again from the review page; the group can upload the file again.`, markedAt: new Date() },
      { where: { id: r.id, status: "queued" } },
    );
    settled += n;
  }
  return settled;
}

/**
 * Releases a practical's marks: students can then see their feedback page. Each member of each
 * group with a submission gets an e-mail, sent through the job queue in the same transaction.
 */
export async function releaseMarks(actor: User, session: LabSession, showReference: boolean): Promise<{ mails: number }> {
  await settleStoppedMarking(session.id);
  const subs = await Submission.findAll({ where: { sessionId: session.id }, attributes: ["groupId", "status"] });
  const pending = subs.filter((s) => s.status === "queued").length;
  if (pending) problem(`${pending} submission(s) are still being marked; release when marking has finished.`, 409);
  const groupIds = [...new Set(subs.map((s) => s.groupId))];
  const groups = await Group.findAll({ where: { id: { [Op.in]: groupIds.length ? groupIds : [0] } }, include: [{ model: GroupMember, as: "members", include: ["user"] }] });
  return getSequelize().transaction(async (transaction) => {
    const before = await releaseInfo(session.id);
    await getSequelize().query("update lab_sessions set marks_released_at = now(), release_shows_reference = :show, updated_at = now() where id = :id", { replacements: { id: session.id, show: showReference }, transaction });
    let mails = 0;
    for (const g of groups) {
      for (const m of g.members ?? []) {
        const user = (m as unknown as { user?: User }).user;
        if (!user) continue;
        await queueMail(user.email, "marks-released", { name: user.displayName, practical: session.title, group: g.name, groupId: g.id }, { transaction });
        mails++;
      }
    }
    await queueScoresToPlatform(session, transaction);
    await recordAudit({ actorId: actor.id, action: "session.marks-released", entityType: "lab_session", entityId: session.id, before, after: { releasedAt: new Date().toISOString(), showsReference: showReference, mails } }, transaction);
    return { mails };
  });
}
