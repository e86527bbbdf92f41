// Reuse: most labs run the same practical every term. A practical is copied (to its own course or
// another) with its reaction system, set-up, rubric and bench design, its dates moved; a course is
// copied to a new term with its staff, reaction systems and practicals, without students, groups,
// uploads or marks. Copies start unassigned and untold ("planned"); both are audited.
import { Op, type Transaction } from "sequelize";
import { Bench, LabSession } from "../db/lab-sessions.server";
import { ReactionSystem } from "../db/reaction-systems.server";
import { Course, CourseMembership, User, sequelize } from "../db/models.server";
import { recordAudit } from "../audit.server";
import { createCourse } from "../courses.server";
import type { FieldErrors, Outcome } from "../people.server";
import { isRealDay } from "~/lib/dates";
import { fromWallTime, wallTime } from "~/lib/time-zone";

const DAY_MS = 86_400_000;

/** Whole days from one YYYY-MM-DD to another (both read as UTC days, so no zone moves them). */
export function daysBetween(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / DAY_MS);
}

/** A YYYY-MM-DD moved by whole days. */
export function moveDay(day: string, days: number): string {
  return new Date(Date.parse(`${day}T00:00:00Z`) + days * DAY_MS).toISOString().slice(0, 10);
}

function dayError(text: string, label: string): string | undefined {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(text)) return `Give the ${label} as YYYY-MM-DD.`;
  if (!isRealDay(text)) return "There is no such day: check the day of the month.";
  return undefined;
}

/** Courses the person may copy a practical into: those they teach (any for an admin), not archived. */
export async function copyTargets(user: User): Promise<{ id: number; code: string; title: string; term: string }[]> {
  const where = { archivedAt: null };
  const courses =
    user.role === "admin"
      ? await Course.findAll({ where, order: [["code", "ASC"], ["term", "ASC"]] })
      : await Course.findAll({
          where,
          include: [{ model: CourseMembership, as: "memberships", where: { userId: user.id, role: "instructor" }, attributes: [] }],
          order: [["code", "ASC"], ["term", "ASC"]],
        });
  return courses.map((c) => ({ id: c.id, code: c.code, title: c.title, term: c.term }));
}

const KINETICS_KEYS = ["name", "speciesA", "speciesB", "coeffA", "coeffB", "orderA", "orderB", "kRef", "TrefC", "EaKJ", "measured"] as const;

/** The target course's own copy of a reaction system: one it already has with the same chemistry, or a new copy. */
async function reactionIn(courseId: number, source: ReactionSystem, transaction: Transaction): Promise<ReactionSystem> {
  if (source.courseId === courseId) return source;
  const same = await ReactionSystem.findAll({ where: { courseId, name: source.name }, transaction });
  const match = same.find((r) => KINETICS_KEYS.every((k) => r[k] === source[k]) && JSON.stringify(r.calibration ?? {}) === JSON.stringify(source.calibration ?? {}));
  if (match) return match;
  const { id: _id, courseId: _c, createdAt: _a, updatedAt: _u, ...fields } = source.get({ plain: true });
  return ReactionSystem.create({ ...fields, courseId }, { transaction });
}

/** One practical copied into a course, its lab day and deadline moved by `days`; no groups on its benches. */
/**
 * The deadline moved by whole days on the courses' wall clocks: 17:00 in Berlin stays 17:00 in
 * Berlin across a clock change (a plain 24 h shift would make it 16:00 or 18:00).
 */
export function movedDeadline(deadline: Date, days: number, zones: { from: string; to: string }): Date {
  const wall = wallTime(deadline, zones.from);
  const moved = fromWallTime(`${moveDay(wall.slice(0, 10), days)}${wall.slice(10)}`, zones.to);
  // a time the target clock skips: an hour later is the same instant as the hour it skips to
  return moved.ok ? moved.at : new Date(deadline.getTime() + days * DAY_MS);
}

async function copyOne(source: LabSession, courseId: number, reactionSystemId: number, days: number, title: string, zones: { from: string; to: string }, transaction: Transaction): Promise<LabSession> {
  const copy = await LabSession.create(
    {
      courseId,
      reactionSystemId,
      title,
      date: moveDay(source.date, days),
      slotMinutes: source.slotMinutes,
      setupMinutes: source.setupMinutes,
      reactorVolumeMl: source.reactorVolumeMl,
      stockAMolL: source.stockAMolL,
      stockBMolL: source.stockBMolL,
      samplingIntervalS: source.samplingIntervalS,
      targetConversion: source.targetConversion,
      rubric: { ...source.rubric },
      deadline: source.deadline ? movedDeadline(source.deadline, days, zones) : null,
      gradeWeight: source.gradeWeight,
      status: "planned",
    },
    { transaction },
  );
  const benches = await Bench.findAll({ where: { sessionId: source.id }, order: [["position", "ASC"]], transaction });
  await Bench.bulkCreate(
    benches.map((b) => ({ sessionId: copy.id, position: b.position, label: b.label, CA0: b.CA0, CB0: b.CB0, temperatureC: b.temperatureC, groupId: null })),
    { transaction },
  );
  return copy;
}

export interface CopyPracticalInput {
  courseId: unknown;
  date: unknown;
  title: unknown;
}

/**
 * Copies a practical to a course the actor teaches. The lab day is the one given; the deadline
 * keeps its distance from the lab day.
 */
export async function copyPractical(actor: User, source: LabSession, input: CopyPracticalInput): Promise<Outcome<LabSession>> {
  const errors: FieldErrors = {};
  const courseId = Number(input.courseId);
  const date = String(input.date ?? "").trim();
  const title = String(input.title ?? "").trim();
  const targets = await copyTargets(actor);
  if (!Number.isInteger(courseId) || !targets.some((t) => t.id === courseId)) errors.courseId = "Choose a course you teach (archived courses take no new practicals).";
  const dateProblem = dayError(date, "lab day");
  if (dateProblem) errors.date = dateProblem;
  if (!title) errors.title = "Enter a title.";
  else if (title.length > 160) errors.title = "Use at most 160 characters.";
  else if (/[\u0000-\u001f\u007f]/.test(title)) errors.title = "Use a title on one line.";
  if (Object.keys(errors).length) return { ok: false, errors };
  const days = daysBetween(source.date, date);
  const copy = await sequelize.transaction(async (transaction) => {
    const reaction = await ReactionSystem.findByPk(source.reactionSystemId, { transaction });
    const target = await reactionIn(courseId, reaction!, transaction);
    const zoneOf = async (id: number) => (await Course.findByPk(id, { attributes: ["id", "timeZone"], transaction }))?.timeZone ?? "UTC";
    const s = await copyOne(source, courseId, target.id, days, title, { from: await zoneOf(source.courseId), to: await zoneOf(courseId) }, transaction);
    await recordAudit(
      { actorId: actor.id, action: "session.copied", entityType: "lab_session", entityId: s.id, before: { sessionId: source.id, courseId: source.courseId }, after: { courseId, date, daysMoved: days } },
      transaction,
    );
    return s;
  });
  return { ok: true, value: copy };
}

export interface CopyCourseInput {
  term: unknown;
  title: unknown;
  firstDate: unknown;
}

/**
 * Copies a course to a new term: same code, the term and title given; its instructors and
 * demonstrators, reaction systems and practicals (dates moved so the first practical falls on
 * `firstDate`, the others keeping their spacing). Students, groups, uploads and marks stay behind.
 */
export async function copyCourse(actor: User, source: Course, input: CopyCourseInput): Promise<Outcome<Course>> {
  const practicals = await LabSession.findAll({ where: { courseId: source.id }, order: [["date", "ASC"], ["id", "ASC"]] });
  const firstDate = String(input.firstDate ?? "").trim();
  const errors: FieldErrors = {};
  if (practicals.length) {
    const problem = dayError(firstDate, "first lab day");
    if (problem) errors.firstDate = problem;
  }
  if (!String(input.term ?? "").trim()) errors.term = "Give the new term, e.g. Spring 2027.";
  if (Object.keys(errors).length) return { ok: false, errors };
  // createCourse checks code, title and term (and that the code is free in that term) as the new-course form does.
  const made = await createCourse(actor, { code: source.code, title: input.title || source.title, term: input.term });
  if (!made.ok) return made;
  const course = made.value;
  const days = practicals.length ? daysBetween(practicals[0].date, firstDate) : 0;
  await sequelize.transaction(async (transaction) => {
    await course.update({ missingCountsAsZero: source.missingCountsAsZero, timeZone: source.timeZone }, { transaction });
    const staff = await CourseMembership.findAll({ where: { courseId: source.id, role: { [Op.in]: ["instructor", "demonstrator"] }, userId: { [Op.ne]: actor.id } }, transaction });
    if (staff.length) await CourseMembership.bulkCreate(staff.map((m) => ({ courseId: course.id, userId: m.userId, role: m.role })), { transaction });
    const reactions = await ReactionSystem.findAll({ where: { courseId: source.id }, order: [["id", "ASC"]], transaction });
    const map = new Map<number, number>();
    for (const r of reactions) {
      const { id: _id, courseId: _c, createdAt: _a, updatedAt: _u, ...fields } = r.get({ plain: true });
      map.set(r.id, (await ReactionSystem.create({ ...fields, courseId: course.id }, { transaction })).id);
    }
    const zones = { from: source.timeZone, to: source.timeZone };
    for (const p of practicals) await copyOne(p, course.id, map.get(p.reactionSystemId)!, days, p.title, zones, transaction);
    await recordAudit(
      {
        actorId: actor.id,
        action: "course.copied",
        entityType: "course",
        entityId: course.id,
        before: { courseId: source.id, term: source.term },
        after: { term: course.term, staff: staff.length + 1, reactionSystems: reactions.length, practicals: practicals.length, daysMoved: days },
      },
      transaction,
    );
  });
  return { ok: true, value: course };
}
