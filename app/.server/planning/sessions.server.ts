// Lab sessions: the designer's schema and checks, saving a session with its benches, who may see
// what, assigning groups to benches, notifying groups, and auditing changes after notification.
import { z } from "zod";
import { parseWithZod } from "@conform-to/zod/v4";
import { data } from "react-router";
import type { Transaction } from "sequelize";
import { Bench, DEFAULT_RUBRIC, LabSession, type Rubric } from "../db/lab-sessions.server";
import { ReactionSystem } from "../db/reaction-systems.server";
import { Group, GroupMember } from "../db/groups.server";
import { Course, User, sequelize, type CourseRole } from "../db/models.server";
import { requireCourseRole } from "../guards.server";
import { recordAudit } from "../audit.server";
import { queueMail } from "../mail/outbox.server";
import { benchProblems, predictBench, proposeBenches, sessionProblems, type BenchFeed, type Problem, type ReactionForDesign, type SessionForDesign } from "~/lib/planning/feed-design";
import { naturalCompare } from "~/lib/natural-order";
import { formatDateTime, isRealDateTime, isRealDay } from "~/lib/dates";
import { fromWallTime } from "~/lib/time-zone";
import { rubricFrom } from "~/lib/marking/rubric";
import { marksOutOf } from "~/lib/marking/rubric-view";
import { rubricExamples } from "~/lib/marking/rubric-example";

const num = (msg: string) => z.number({ error: msg });
const int = (msg: string) => z.number({ error: msg }).int({ error: "Use a whole number." });

export const benchSchema = z.object({
  label: z.string({ error: "Give the bench a label." }).trim().min(1, { error: "Give the bench a label." }).max(20, { error: "Use at most 20 characters." }),
  CA0: num("Enter CA0 in mol/L.").positive({ error: "CA0 must be above 0 mol/L." }),
  CB0: num("Enter CB0 in mol/L.").positive({ error: "CB0 must be above 0 mol/L." }),
  temperatureC: num("Enter the temperature in °C.").min(0, { error: "Use 0 to 100 °C." }).max(100, { error: "Use 0 to 100 °C." }),
});

const sessionFields = {
  title: z.string({ error: "Enter a title." }).trim().min(1, { error: "Enter a title." }).max(160, { error: "Use at most 160 characters." }),
  date: z
    .string({ error: "Choose the lab day." })
    .regex(/^\d{4}-\d{2}-\d{2}$/, { error: "Use the date form YYYY-MM-DD." })
    .refine((t) => !/^\d{4}-\d{2}-\d{2}$/.test(t) || isRealDay(t), { error: "There is no such day: check the day of the month." }),
  reactionSystemId: int("Choose a reaction system.").positive({ error: "Choose a reaction system." }),
  slotMinutes: int("Enter the slot length in minutes.").positive({ error: "The slot must be longer than 0 minutes." }).max(720, { error: "A slot of more than 12 h is not a lab session." }),
  setupMinutes: int("Enter the set-up time in minutes.").min(0, { error: "Set-up time cannot be negative." }),
  reactorVolumeMl: num("Enter the reactor volume in mL.").positive({ error: "The reactor volume must be above 0 mL." }),
  stockAMolL: num("Enter the stock concentration of A in mol/L.").positive({ error: "The stock of A must be above 0 mol/L." }),
  stockBMolL: num("Enter the stock concentration of B in mol/L.").positive({ error: "The stock of B must be above 0 mol/L." }),
  samplingIntervalS: int("Enter the sampling interval in seconds.").positive({ error: "The sampling interval must be longer than 0 s." }),
  targetConversionPct: num("Enter the target conversion in %.").gt(0, { error: "Use more than 0 %." }).lt(100, { error: "Use less than 100 %." }),
  // a whole date and time and nothing after it; 31 February is refused, not moved to 3 March
  deadline: z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2})?$/, { error: "Use a date and time (YYYY-MM-DDTHH:MM), with nothing after it." })
    .refine((t) => !/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2})?$/.test(t) || isRealDateTime(t), { error: "There is no such date or time: check the day of the month and the hour." })
    .optional(),
  fullWithinPct: num("Enter a percentage.").positive({ error: "Use more than 0 %." }),
  partialWithinPct: num("Enter a percentage.").positive({ error: "Use more than 0 %." }),
  partialFraction: num("Enter a fraction from 0 to 1.").min(0, { error: "Use 0 to 1." }).max(1, { error: "Use 0 to 1." }),
  // the analysis check's share as marks out of 100 (the experiment check gets the rest)
  analysisMarks: num("Enter the analysis check's marks, 0 to 100.").min(0, { error: "Use 0 to 100 marks." }).max(100, { error: "Use 0 to 100 marks." }),
  analysisFullWithinPct: num("Enter a percentage.").positive({ error: "Use more than 0 %." }),
  analysisPartialWithinPct: num("Enter a percentage.").positive({ error: "Use more than 0 %." }),
  analysisPartialFraction: num("Enter a fraction from 0 to 1.").min(0, { error: "Use 0 to 1." }).max(1, { error: "Use 0 to 1." }),
  latePenaltyPct: num("Enter a percentage.").min(0, { error: "Use 0 to 100 %." }).max(100, { error: "Use 0 to 100 %." }),
  correctionCostPct: num("Enter a percentage.").min(0, { error: "Use 0 to 100 %." }).max(100, { error: "Use 0 to 100 %." }),
};

const designFields = {
  benchCount: int("Enter the number of benches.").min(1, { error: "Use at least 1 bench." }).max(40, { error: "Use at most 40 benches." }),
  CA0: num("Enter CA0 in mol/L.").positive({ error: "CA0 must be above 0 mol/L." }),
  ratioMin: num("Enter the smallest feed ratio.").positive({ error: "The feed ratio must be above 0." }),
  ratioMax: num("Enter the largest feed ratio.").positive({ error: "The feed ratio must be above 0." }),
  tempMinC: num("Enter the lowest temperature in °C.").min(0, { error: "Use 0 to 100 °C." }).max(100, { error: "Use 0 to 100 °C." }),
  tempMaxC: num("Enter the highest temperature in °C.").min(0, { error: "Use 0 to 100 °C." }).max(100, { error: "Use 0 to 100 °C." }),
};

function sessionRules(s: { slotMinutes?: number; setupMinutes?: number; fullWithinPct?: number; partialWithinPct?: number; analysisFullWithinPct?: number; analysisPartialWithinPct?: number }, ctx: z.RefinementCtx) {
  if (s.slotMinutes !== undefined && s.setupMinutes !== undefined && s.setupMinutes >= s.slotMinutes) ctx.addIssue({ code: "custom", path: ["setupMinutes"], message: "Set-up must leave time for the run inside the slot." });
  if (s.fullWithinPct !== undefined && s.partialWithinPct !== undefined && s.partialWithinPct < s.fullWithinPct) ctx.addIssue({ code: "custom", path: ["partialWithinPct"], message: "Partial marks must reach at least as far as full marks." });
  if (s.analysisFullWithinPct !== undefined && s.analysisPartialWithinPct !== undefined && s.analysisPartialWithinPct < s.analysisFullWithinPct) ctx.addIssue({ code: "custom", path: ["analysisPartialWithinPct"], message: "Partial marks must reach at least as far as full marks." });
}

/** The rubric fields alone (the planning form's live example checks only these). */
export const rubricSchema = z
  .object({
    fullWithinPct: sessionFields.fullWithinPct,
    partialWithinPct: sessionFields.partialWithinPct,
    partialFraction: sessionFields.partialFraction,
    analysisMarks: sessionFields.analysisMarks,
    analysisFullWithinPct: sessionFields.analysisFullWithinPct,
    analysisPartialWithinPct: sessionFields.analysisPartialWithinPct,
    analysisPartialFraction: sessionFields.analysisPartialFraction,
    latePenaltyPct: sessionFields.latePenaltyPct,
    correctionCostPct: sessionFields.correctionCostPct,
  })
  .superRefine(sessionRules);
export type RubricInput = z.output<typeof rubricSchema>;

/** "propose" needs the session and design fields; "save" needs the session fields and the benches. */
export const proposeSchema = z.object({ ...sessionFields, ...designFields }).superRefine(sessionRules);
export const saveSchema = z
  .object({ ...sessionFields, benches: z.array(benchSchema, { error: "Propose or enter the benches first." }).min(1, { error: "Add at least one bench." }).max(40) })
  .superRefine(sessionRules);

export type SaveInput = z.output<typeof saveSchema>;

export function parseRubricForm(form: FormData) {
  return parseWithZod(form, { schema: rubricSchema });
}

/** What a stored rubric gives the invented example runs on this reaction system (staff only). */
export function rubricExampleFor(rs: ReactionSystem, rubric: Rubric) {
  const marking = rubricFrom(rubric);
  return {
    outOf: marksOutOf(marking),
    runs: rubricExamples({ a: rs.coeffA, b: rs.coeffB, orderA: rs.orderA, orderB: rs.orderB, kRef: rs.kRef, TrefC: rs.TrefC }, marking),
  };
}

export function parseDesignForm(form: FormData, intent: "propose" | "save") {
  return parseWithZod(form, { schema: intent === "propose" ? proposeSchema : saveSchema });
}

export function reactionForDesign(rs: ReactionSystem): ReactionForDesign {
  return { coeffA: rs.coeffA, coeffB: rs.coeffB, orderA: rs.orderA, orderB: rs.orderB, kRef: rs.kRef, TrefC: rs.TrefC, EaKJ: rs.EaKJ };
}

export function sessionForDesign(s: { slotMinutes: number; setupMinutes: number; samplingIntervalS: number; reactorVolumeMl: number; stockAMolL: number; stockBMolL: number; targetConversionPct?: number; targetConversion?: number }): SessionForDesign {
  return {
    slotMinutes: s.slotMinutes,
    setupMinutes: s.setupMinutes,
    samplingIntervalS: s.samplingIntervalS,
    reactorVolumeMl: s.reactorVolumeMl,
    stockAMolL: s.stockAMolL,
    stockBMolL: s.stockBMolL,
    targetConversion: s.targetConversion ?? (s.targetConversionPct ?? 80) / 100,
  };
}

export { proposeBenches, predictBench };

/** Problems that block saving (bad numbers, twins, stocks that overfill the reactor). */
export function blockingProblems(reaction: ReactionForDesign, session: SessionForDesign, benches: readonly BenchFeed[]): Problem[] {
  const problems = [...sessionProblems(session), ...benchProblems(benches)];
  if (problems.length) return problems;
  benches.forEach((b, i) => {
    const p = predictBench(reaction, session, b);
    const over = p.warnings.find((w) => w.code === "volume");
    if (over) problems.push({ path: `benches[${i}].CA0`, message: `Bench ${b.label}: ${over.message} Use a stronger stock or a lower feed.` });
  });
  return problems;
}

/** A reaction system of this course, or null. */
export function courseReaction(courseId: number, id: number) {
  return ReactionSystem.findOne({ where: { id, courseId } });
}

/** The form's rubric in the stored shape (the analysis marks out of 100 as a share of 1). */
export function rubricOf(input: RubricInput): Rubric {
  const analysisWeight = Number((input.analysisMarks / 100).toFixed(6));
  return {
    fullWithinPct: input.fullWithinPct,
    partialWithinPct: input.partialWithinPct,
    partialFraction: input.partialFraction,
    analysisWeight,
    experimentWeight: Number((1 - analysisWeight).toFixed(6)),
    latePenaltyPct: input.latePenaltyPct,
    analysisFullWithinPct: input.analysisFullWithinPct,
    analysisPartialWithinPct: input.analysisPartialWithinPct,
    analysisPartialFraction: input.analysisPartialFraction,
    correctionCostPct: input.correctionCostPct,
  };
}

/** The planning form's rubric fields (strings) for a stored rubric, e.g. the defaults. */
export function rubricFormValues(r: Rubric): Record<string, string> {
  const m = rubricFrom(r);
  return {
    fullWithinPct: String(m.experiment.fullWithinPct),
    partialWithinPct: String(m.experiment.partialWithinPct),
    partialFraction: String(m.experiment.partialFraction),
    analysisMarks: String(marksOutOf(m).analysis),
    analysisFullWithinPct: String(m.analysis.fullWithinPct),
    analysisPartialWithinPct: String(m.analysis.partialWithinPct),
    analysisPartialFraction: String(m.analysis.partialFraction),
    latePenaltyPct: String(m.latePenaltyPct),
    correctionCostPct: String(m.correctionCostPct),
  };
}

export async function createSession(actor: User, courseId: number, input: SaveInput): Promise<{ ok: true; value: LabSession } | { ok: false; errors: Record<string, string[]> }> {
  const rs = await courseReaction(courseId, input.reactionSystemId);
  if (!rs) return { ok: false, errors: { reactionSystemId: ["Choose a reaction system of this course."] } };
  const problems = blockingProblems(reactionForDesign(rs), sessionForDesign(input), input.benches);
  if (problems.length) return { ok: false, errors: groupProblems(problems) };
  const deadline = deadlineIn(input.deadline, await courseZone(courseId));
  if (!deadline.ok) return { ok: false, errors: { deadline: [deadline.message] } };
  const session = await sequelize.transaction(async (transaction) => {
    const s = await LabSession.create(
      {
        courseId,
        reactionSystemId: rs.id,
        title: input.title,
        date: input.date,
        slotMinutes: input.slotMinutes,
        setupMinutes: input.setupMinutes,
        reactorVolumeMl: input.reactorVolumeMl,
        stockAMolL: input.stockAMolL,
        stockBMolL: input.stockBMolL,
        samplingIntervalS: input.samplingIntervalS,
        targetConversion: input.targetConversionPct / 100,
        rubric: rubricOf(input),
        deadline: deadline.at,
        status: "planned",
      },
      { transaction },
    );
    await Bench.bulkCreate(
      input.benches.map((b, i) => ({ sessionId: s.id, position: i + 1, label: b.label, CA0: b.CA0, CB0: b.CB0, temperatureC: b.temperatureC, groupId: null })),
      { transaction },
    );
    await recordAudit({ actorId: actor.id, action: "session.created", entityType: "lab_session", entityId: s.id, after: { title: s.title, benches: input.benches.length } }, transaction);
    return s;
  });
  return { ok: true, value: session };
}

/**
 * The form's deadline is a wall time on the course's clock (datetime-local has no zone): read it
 * in the course's time zone on any server. A time the clocks skip is refused beside the field.
 */
export function deadlineIn(text: string | undefined, timeZone: string): { ok: true; at: Date | null } | { ok: false; message: string } {
  if (!text) return { ok: true, at: null };
  if (/(Z|[+-]\d\d:?\d\d)$/i.test(text)) return { ok: true, at: new Date(text) };
  const r = fromWallTime(text, timeZone);
  if (r.ok) return { ok: true, at: r.at };
  return { ok: false, message: r.reason === "gap" ? `There is no ${text.replace("T", " ")} in ${timeZone}: the clocks skip that hour. Choose a time outside it.` : "Use a date and time (YYYY-MM-DDTHH:MM)." };
}

async function courseZone(courseId: number): Promise<string> {
  return (await Course.findByPk(courseId, { attributes: ["id", "timeZone"] }))?.timeZone ?? "UTC";
}

export function groupProblems(problems: Problem[]): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const p of problems) (out[p.path || ""] ??= []).push(p.message);
  return out;
}

export interface SessionAccess {
  session: LabSession;
  reaction: ReactionSystem;
  course: Course;
  role: CourseRole;
  staff: boolean;
  /** the caller's group in this course, if any */
  myGroupId: number | null;
}

/** The session if the caller is a member of its course (404 when it does not exist, 403 for outsiders). */
export async function sessionAccess(user: User, sessionId: number, api = false, options: { whileArchived?: boolean } = {}): Promise<SessionAccess> {
  const session = await LabSession.findByPk(sessionId, { include: [{ model: ReactionSystem, as: "reactionSystem" }, { model: Course, as: "course" }] });
  if (!session) {
    if (api) throw Response.json({ error: "There is no practical with this id." }, { status: 404 });
    throw data({ message: "There is no practical at this address." }, { status: 404 });
  }
  const role = await requireCourseRole(user, session.courseId, ["instructor", "demonstrator", "student"], api, options);
  const membership = await GroupMember.findOne({ where: { userId: user.id, courseId: session.courseId } });
  return {
    session,
    reaction: session.reactionSystem!,
    course: (session as unknown as { course: Course }).course,
    role,
    staff: role !== "student",
    myGroupId: membership?.groupId ?? null,
  };
}

export function benchesOf(sessionId: number) {
  return Bench.findAll({ where: { sessionId }, include: [{ model: Group, as: "group" }], order: [["position", "ASC"]] });
}

/** The session as the JSON API and the pages show it: staff get the reference, students only their own bench. */
export async function sessionView(access: SessionAccess) {
  const { session, reaction, staff } = access;
  const all = await benchesOf(session.id);
  const benches = staff ? all : all.filter((b) => b.groupId !== null && b.groupId === access.myGroupId);
  const rd = reactionForDesign(reaction);
  const sd = sessionForDesign(session);
  return {
    id: session.id,
    courseId: session.courseId,
    title: session.title,
    date: session.date,
    status: session.status,
    slotMinutes: session.slotMinutes,
    setupMinutes: session.setupMinutes,
    samplingIntervalS: session.samplingIntervalS,
    reactorVolumeMl: session.reactorVolumeMl,
    stockAMolL: session.stockAMolL,
    stockBMolL: session.stockBMolL,
    deadline: session.deadline ? session.deadline.toISOString() : null,
    notifiedAt: session.notifiedAt ? session.notifiedAt.toISOString() : null,
    reaction: {
      name: reaction.name,
      speciesA: reaction.speciesA,
      speciesB: reaction.speciesB,
      a: reaction.coeffA,
      b: reaction.coeffB,
      orderA: reaction.orderA,
      orderB: reaction.orderB,
      measured: reaction.measured,
      ...(staff ? { reference: { k: reaction.kRef, TrefC: reaction.TrefC, EaKJ: reaction.EaKJ, source: reaction.referenceSource } } : {}),
    },
    benches: benches.map((b) => {
      const p = predictBench(rd, sd, b);
      return {
        id: b.id,
        label: b.label,
        CA0: b.CA0,
        CB0: b.CB0,
        temperatureC: b.temperatureC,
        groupId: b.groupId,
        groupName: b.group?.name ?? null,
        // The predicted time is the closed form from the reference k at this bench: inverting it gives k,
        // so only staff get it; a student sees the target alone (minutesToTarget null).
        predicted: { minutesToTarget: staff && Number.isFinite(p.minutesToTarget) ? p.minutesToTarget : null, targetConversion: session.targetConversion },
        ...(staff ? { reference: { kAtT: p.kAtT }, warnings: p.warnings } : {}),
      };
    }),
    ...(staff ? { rubric: session.rubric } : {}),
  };
}

export type SessionView = Awaited<ReturnType<typeof sessionView>>;

/** Sessions of a course for its members (no reference values in the list for anyone). */
export async function courseSessions(courseId: number) {
  const sessions = await LabSession.findAll({ where: { courseId }, order: [["date", "ASC"], ["id", "ASC"]] });
  const counts = await Bench.count({ where: { sessionId: sessions.map((s) => s.id) }, group: ["sessionId"] });
  const byId = new Map((counts as unknown as Array<{ sessionId: number; count: number }>).map((c) => [c.sessionId, Number(c.count)]));
  return sessions.map((s) => ({ id: s.id, title: s.title, date: s.date, slotMinutes: s.slotMinutes, status: s.status, benchCount: byId.get(s.id) ?? 0 }));
}

/** Every change to a session after its groups were told goes into the audit log. */
async function auditIfNotified(actor: User, session: LabSession, action: string, before: unknown, after: unknown, transaction: Transaction) {
  if (!session.notifiedAt) return;
  await recordAudit({ actorId: actor.id, action, entityType: "lab_session", entityId: session.id, before, after }, transaction);
}

/** Change one bench's feed or label (instructors); refused when it would break the session's rules. */
export async function updateBench(actor: User, session: LabSession, reaction: ReactionSystem, benchId: number, input: z.output<typeof benchSchema>) {
  const benches = await Bench.findAll({ where: { sessionId: session.id }, order: [["position", "ASC"]] });
  const index = benches.findIndex((b) => b.id === benchId);
  if (index < 0) return { ok: false as const, errors: { "": ["That bench is not part of this practical."] } };
  const next = benches.map((b, i) => (i === index ? { ...input } : { label: b.label, CA0: b.CA0, CB0: b.CB0, temperatureC: b.temperatureC }));
  const problems = blockingProblems(reactionForDesign(reaction), sessionForDesign(session), next).filter((p) => p.path.startsWith(`benches[${index}]`) || !p.path.startsWith("benches"));
  if (problems.length) return { ok: false as const, errors: { [""]: problems.map((p) => p.message) } };
  const bench = benches[index];
  const before = { label: bench.label, CA0: bench.CA0, CB0: bench.CB0, temperatureC: bench.temperatureC };
  await sequelize.transaction(async (transaction) => {
    await bench.update(input, { transaction });
    await auditIfNotified(actor, session, "session.bench-changed-after-notice", { benchId, ...before }, { benchId, ...input }, transaction);
  });
  return { ok: true as const };
}

/**
 * Groups to benches. `mapping` gives a group id (or null) per bench id; "auto" fills benches in
 * order with the groups not yet placed, in natural name order. One group a bench.
 * `shown` is what the form showed per bench: a bench the person did not change keeps what it has
 * now (a stale form never undoes someone else's or an automatic fill), and taking a group off a
 * bench needs `confirmRemove`, so one press cannot clear the plan.
 */
export async function assignGroups(
  actor: User,
  session: LabSession,
  mode: "auto" | "manual",
  mapping: Record<number, number | null> = {},
  shown?: Record<number, number | null>,
  confirmRemove = false,
) {
  const benches = await Bench.findAll({ where: { sessionId: session.id }, order: [["position", "ASC"]] });
  const groups = (await Group.findAll({ where: { courseId: session.courseId } })).sort((a, b) => naturalCompare(a.name, b.name));
  const groupIds = new Set(groups.map((g) => g.id));
  const target = new Map<number, number | null>(benches.map((b) => [b.id, b.groupId]));
  if (mode === "manual") {
    const removing: string[] = [];
    for (const [benchId, groupId] of Object.entries(mapping)) {
      const id = Number(benchId);
      if (!target.has(id)) return { ok: false as const, message: `Bench ${benchId} is not part of this practical.` };
      if (groupId !== null && !groupIds.has(groupId)) return { ok: false as const, message: "One of the chosen groups is not in this course." };
      if (shown && id in shown && shown[id] === groupId) continue; // not changed in the form
      const now = target.get(id) ?? null;
      if (now !== null && groupId === null) removing.push(benches.find((b) => b.id === id)!.label);
      target.set(id, groupId);
    }
    if (removing.length && !confirmRemove) {
      return {
        ok: false as const,
        confirm: true as const,
        message: `This takes the group off bench ${removing.join(", ")}. Nothing was saved: tick "Yes, take these groups off their benches" and save again to go ahead.`,
      };
    }
  } else {
    const placed = new Set([...target.values()].filter((g): g is number => g !== null));
    const free = groups.filter((g) => !placed.has(g.id));
    for (const b of benches) if (target.get(b.id) === null && free.length) target.set(b.id, free.shift()!.id);
  }
  const used = new Map<number, string>();
  for (const b of benches) {
    const g = target.get(b.id);
    if (g === null || g === undefined) continue;
    if (used.has(g)) {
      const name = groups.find((x) => x.id === g)!.name;
      return { ok: false as const, message: `${name} is at bench ${used.get(g)} and bench ${b.label}; give each group one bench.` };
    }
    used.set(g, b.label);
  }
  const before = Object.fromEntries(benches.map((b) => [b.label, b.groupId]));
  const after = Object.fromEntries(benches.map((b) => [b.label, target.get(b.id) ?? null]));
  await sequelize.transaction(async (transaction) => {
    // clear first, so swapping two groups does not trip the one-bench-per-group index
    await Bench.update({ groupId: null }, { where: { sessionId: session.id }, transaction });
    for (const b of benches) {
      const g = target.get(b.id) ?? null;
      if (g !== null) await Bench.update({ groupId: g }, { where: { id: b.id }, transaction });
    }
    await auditIfNotified(actor, session, "session.groups-changed-after-notice", before, after, transaction);
  });
  return { ok: true as const, placed: used.size, unplaced: groups.length - used.size };
}

/** E-mails every member of every assigned group the link to their bench sheet (through the job queue). */
export async function notifyGroups(actor: User, session: LabSession) {
  const benches = await Bench.findAll({ where: { sessionId: session.id }, order: [["position", "ASC"]] });
  const assigned = benches.filter((b) => b.groupId !== null);
  if (!assigned.length) return { ok: false as const, message: "Assign groups to benches first: no group has a bench yet." };
  const members = await GroupMember.findAll({ where: { groupId: assigned.map((b) => b.groupId!) }, include: [{ model: User, as: "user" }, { model: Group, as: "group" }] });
  const zone = await courseZone(session.courseId);
  let sent = 0;
  await sequelize.transaction(async (transaction) => {
    for (const m of members) {
      const bench = assigned.find((b) => b.groupId === m.groupId)!;
      await queueMail(
        m.user!.email,
        "bench-notice",
        {
          name: m.user!.displayName,
          group: m.group!.name,
          practical: session.title,
          date: session.date,
          bench: bench.label,
          sessionId: session.id,
          benchId: bench.id,
          groupId: m.groupId,
          deadlineUtc: session.deadline ? session.deadline.toISOString().slice(0, 16).replace("T", " ") : null,
          ...(session.deadline ? { deadlineShown: formatDateTime(session.deadline, zone) } : {}),
        },
        { transaction },
      );
      sent++;
    }
    const before = { status: session.status, notifiedAt: session.notifiedAt };
    await session.update({ status: "notified", notifiedAt: new Date() }, { transaction });
    await recordAudit({ actorId: actor.id, action: "session.groups-notified", entityType: "lab_session", entityId: session.id, before, after: { status: "notified", mails: sent } }, transaction);
  });
  return { ok: true as const, sent };
}

/** The practical's own numbers that can change after it was planned (instructors). */
export const detailsSchema = z
  .object({
    title: sessionFields.title,
    date: sessionFields.date,
    slotMinutes: sessionFields.slotMinutes,
    setupMinutes: sessionFields.setupMinutes,
    samplingIntervalS: sessionFields.samplingIntervalS,
    deadline: sessionFields.deadline,
  })
  .superRefine(sessionRules);

export async function updateSessionDetails(actor: User, session: LabSession, input: z.output<typeof detailsSchema>): Promise<{ ok: true } | { ok: false; errors: Record<string, string[]> }> {
  const pick = (s: { title: string; date: string; slotMinutes: number; setupMinutes: number; samplingIntervalS: number; deadline: Date | null }) => ({
    title: s.title,
    date: s.date,
    slotMinutes: s.slotMinutes,
    setupMinutes: s.setupMinutes,
    samplingIntervalS: s.samplingIntervalS,
    deadline: s.deadline ? s.deadline.toISOString() : null,
  });
  const before = pick(session);
  const deadline = deadlineIn(input.deadline, await courseZone(session.courseId));
  if (!deadline.ok) return { ok: false, errors: { deadline: [deadline.message] } };
  const next = { ...input, deadline: deadline.at };
  await sequelize.transaction(async (transaction) => {
    await session.update(next, { transaction });
    await auditIfNotified(actor, session, "session.details-changed-after-notice", before, pick({ ...next }), transaction);
  });
  return { ok: true };
}

export { DEFAULT_RUBRIC };
