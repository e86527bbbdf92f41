// Who may upload for or look at a group's work, and the practical it belongs to: the bench's feed
// and temperature, the reaction system, its reference and the rubric, as marking needs them.
import { data } from "react-router";
import { Op } from "sequelize";
import type { User } from "../db/models.server";
import { CourseMembership } from "../db/models.server";
import { refuseWriteIfArchived } from "../guards.server";
import { Group, GroupMember } from "../db/groups.server";
import { Bench, LabSession } from "../db/lab-sessions.server";
import { ReactionSystem } from "../db/reaction-systems.server";
import type { Measurement } from "~/lib/kinetics";
import { rubricFrom } from "~/lib/marking/rubric";
import type { MarkingContext } from "~/lib/marking/mark-run";
import type { TitrationSetup } from "~/lib/marking/titres";

export type Viewer = "staff" | "member";

function deny(status: 403 | 404, message: string, api: boolean): never {
  if (api) throw Response.json({ error: message }, { status });
  throw data({ message }, { status });
}

/** Staff of the group's course see every group; a student sees only a group they are in (404 otherwise: its existence must not leak). */
export async function viewerOfGroup(user: User, group: Group, api: boolean): Promise<Viewer> {
  if (user.role === "admin") return refuseWriteIfArchived(user, group.courseId, api).then(() => "staff" as const);
  const membership = await CourseMembership.findOne({ where: { courseId: group.courseId, userId: user.id } });
  if (membership && (membership.role === "instructor" || membership.role === "demonstrator")) {
    await refuseWriteIfArchived(user, group.courseId, api);
    return "staff";
  }
  // Group rights hold only while the person is still on the course (a stale group row grants nothing).
  const inGroup = membership ? await GroupMember.findOne({ where: { groupId: group.id, userId: user.id } }) : null;
  if (inGroup) {
    await refuseWriteIfArchived(user, group.courseId, api);
    return "member";
  }
  if (membership) deny(404, "There is no such group among yours.", api);
  deny(403, "You are not a member of this course.", api);
}

export async function requireGroup(user: User, groupId: number, api: boolean): Promise<{ group: Group; viewer: Viewer }> {
  const group = await Group.findByPk(groupId);
  if (!group) deny(404, "There is no such group.", api);
  return { group, viewer: await viewerOfGroup(user, group, api) };
}

/** Staff of a session's course (instructors, demonstrators, admins), or 403/404. */
export async function requireSessionStaff(user: User, sessionId: number, api: boolean, roles: readonly string[] = ["instructor", "demonstrator"]): Promise<LabSession> {
  const session = await LabSession.findByPk(sessionId);
  if (!session) deny(404, "There is no such practical.", api);
  if (user.role !== "admin") {
    const membership = await CourseMembership.findOne({ where: { courseId: session.courseId, userId: user.id } });
    if (!membership) deny(403, "You are not a member of this course.", api);
    if (!roles.includes(membership.role)) deny(403, `This needs the course role ${roles.join(" or ")}; yours is ${membership.role}.`, api);
  }
  await refuseWriteIfArchived(user, session.courseId, api);
  return session;
}

export interface PracticalOfGroup {
  session: LabSession;
  bench: Bench;
  system: ReactionSystem;
}

/**
 * The practical a group's upload is for: the one named, else the group's bench in the practical
 * nearest today that is not closed (then the latest one).
 */
export async function practicalFor(groupId: number, sessionId: number | null): Promise<PracticalOfGroup | null> {
  const benches = await Bench.findAll({
    where: sessionId ? { groupId, sessionId } : { groupId },
    include: [{ model: LabSession, as: "session", include: [{ model: ReactionSystem, as: "reactionSystem" }] }],
  });
  if (!benches.length) return null;
  const today = new Date().toISOString().slice(0, 10);
  const score = (b: Bench) => {
    const s = b.session!;
    const open = s.status !== "closed" ? 0 : 1;
    const distance = Math.abs(Date.parse(s.date) - Date.parse(today));
    return [open, distance] as const;
  };
  benches.sort((a, b) => {
    const [oa, da] = score(a);
    const [ob, db] = score(b);
    return oa - ob || da - db;
  });
  const bench = benches[0];
  return { session: bench.session!, bench, system: bench.session!.reactionSystem! };
}

export async function practicalOfSubmission(sessionId: number, benchId: number | null, groupId: number): Promise<PracticalOfGroup | null> {
  const bench = benchId
    ? await Bench.findByPk(benchId, { include: [{ model: LabSession, as: "session", include: [{ model: ReactionSystem, as: "reactionSystem" }] }] })
    : await Bench.findOne({ where: { sessionId, groupId }, include: [{ model: LabSession, as: "session", include: [{ model: ReactionSystem, as: "reactionSystem" }] }] });
  if (!bench) return null;
  return { session: bench.session!, bench, system: bench.session!.reactionSystem! };
}

export { valueHints } from "./parse.server";

/** The engine's measurement for the practical's measured quantity (conductivity: S0 from the first reading, S∞ fitted). */
export function measurementOf(system: ReactionSystem): Measurement {
  const cal = (system.calibration ?? {}) as Record<string, unknown>;
  switch (system.measured) {
    case "conductivity":
      return { kind: "signal", S0: NaN };
    case "absorbance":
      return {
        kind: "absorbance",
        species: cal.absorbingSpecies === "B" ? "B" : "A",
        epsilon: Number(cal.epsilon ?? NaN),
        pathCm: Number(cal.pathCm ?? 1),
      };
    case "titration":
      return cal.titratedSpecies === "B" ? { kind: "concentrationB" } : { kind: "concentrationA" };
    default:
      return { kind: "concentrationA" };
  }
}

/** A conductivity practical's stored start and final conductivity (only the final one is used: S∞). */
export function conductivityOf(system: ReactionSystem): { start?: number; end?: number } | undefined {
  if (system.measured !== "conductivity") return undefined;
  const cal = (system.calibration ?? {}) as Record<string, unknown>;
  const num = (x: unknown) => (typeof x === "number" && Number.isFinite(x) ? x : undefined);
  return { start: num(cal.conductivityStart), end: num(cal.conductivityEnd) };
}

/** A titration practical's stored calibration as the marking needs it (titres in mL to mol/L). */
export function titrationOf(system: ReactionSystem): TitrationSetup | undefined {
  if (system.measured !== "titration") return undefined;
  const cal = (system.calibration ?? {}) as Record<string, unknown>;
  const positive = (x: unknown) => (typeof x === "number" && x > 0 ? x : undefined);
  const titrantMolL = positive(cal.titrantMolL);
  const aliquotMl = positive(cal.aliquotMl);
  if (!titrantMolL || !aliquotMl) return undefined;
  const quenchMolL = positive(cal.quenchMolL);
  const quenchMl = positive(cal.quenchMl);
  return {
    species: cal.titratedSpecies === "B" ? "B" : "A",
    titrantMolL,
    aliquotMl,
    speciesPerTitrant: positive(cal.titrationRatio) ?? 1,
    ...(quenchMolL && quenchMl ? { quench: { molL: quenchMolL, ml: quenchMl, speciesPerQuench: positive(cal.quenchRatio) ?? 1 } } : {}),
  };
}

export function markingContext(p: PracticalOfGroup): MarkingContext {
  return {
    titration: titrationOf(p.system),
    conductivity: conductivityOf(p.system),
    reaction: { a: p.system.coeffA, b: p.system.coeffB, orderA: p.system.orderA, orderB: p.system.orderB },
    feed: { CA0: p.bench.CA0, CB0: p.bench.CB0 },
    temperatureC: p.bench.temperatureC,
    measurement: measurementOf(p.system),
    reference: { k: p.system.kRef, TrefC: p.system.TrefC, EaKJ: p.system.EaKJ },
    rubric: rubricFrom(p.session.rubric),
  };
}

/** Groups of a session with a bench, for the review queue. */
export async function benchesOfSession(sessionId: number) {
  return Bench.findAll({ where: { sessionId, groupId: { [Op.ne]: null } }, include: [{ model: Group, as: "group" }], order: [["position", "ASC"]] });
}
