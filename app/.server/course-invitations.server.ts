// Invitations of people who already have a Ratebook account to a course. Their account is
// theirs: nobody else renames it or enrols it. The roster import (and any later caller) records
// an invitation and mails it; the person accepts or declines on their dashboard, and only then
// does a membership (and the group the roster named) exist.
import type { Transaction } from "sequelize";
import { sequelize, Course, CourseMembership, User, type CourseRole } from "./db/models.server";
import { CourseInvitation } from "./db/course-invitations.server";
import { Group, GroupMember } from "./db/groups.server";
import { recordAudit } from "./audit.server";
import { queueMail } from "./mail/outbox.server";

const ROLE_WORDS: Record<CourseRole, string> = { student: "a student", demonstrator: "a demonstrator", instructor: "an instructor" };

/**
 * Records (or refreshes) an invitation of an existing account and queues its mail, in the
 * caller's transaction. Nothing about the account or the course's members changes.
 */
export async function inviteExistingPerson(
  actor: User,
  course: Course,
  user: User,
  what: { role: CourseRole; studentNumber?: string | null; groupName?: string | null },
  transaction: Transaction,
): Promise<CourseInvitation> {
  const values = { role: what.role, studentNumber: what.studentNumber || null, groupName: what.groupName || null, invitedById: actor.id };
  let invitation = await CourseInvitation.findOne({ where: { courseId: course.id, userId: user.id }, transaction });
  if (invitation) await invitation.update(values, { transaction });
  else invitation = await CourseInvitation.create({ courseId: course.id, userId: user.id, ...values }, { transaction });
  await recordAudit({ actorId: actor.id, action: "course-invitation.sent", entityType: "course_invitation", entityId: invitation.id, after: { courseId: course.id, userId: user.id, ...values } }, transaction);
  await queueMail(user.email, "course-invitation", { name: user.displayName, inviter: actor.displayName, courseCode: course.code, courseTitle: course.title, role: ROLE_WORDS[what.role] }, { transaction });
  return invitation;
}

export interface OpenInvitation {
  id: number;
  courseCode: string;
  courseTitle: string;
  term: string;
  role: CourseRole;
  inviter: string | null;
}

/** The person's invitations waiting for an answer (courses in the archive cannot be joined). */
export async function openInvitationsFor(user: User): Promise<OpenInvitation[]> {
  const rows = await CourseInvitation.findAll({ where: { userId: user.id }, include: [{ model: Course, as: "course", where: { archivedAt: null }, required: true }], order: [["createdAt", "ASC"]] });
  const inviters = new Map((await User.findAll({ where: { id: rows.map((r) => r.invitedById).filter((x): x is number => x !== null) } })).map((u) => [u.id, u.displayName]));
  return rows.map((r) => ({ id: r.id, courseCode: r.course!.code, courseTitle: r.course!.title, term: r.course!.term, role: r.role, inviter: r.invitedById ? (inviters.get(r.invitedById) ?? null) : null }));
}

export type InvitationAnswer = { ok: true; message: string; courseId: number } | { ok: false; status: 404 | 409; message: string };

/** Accepts one's own invitation: the membership, the roster's student ID and group, audited. */
export async function answerCourseInvitation(user: User, invitationId: number, accept: boolean): Promise<InvitationAnswer> {
  return sequelize.transaction(async (transaction) => {
    const invitation = await CourseInvitation.findOne({ where: { id: invitationId, userId: user.id }, transaction, lock: transaction.LOCK.UPDATE });
    const course = invitation ? await Course.findByPk(invitation.courseId, { transaction }) : null;
    if (!invitation || !course) return { ok: false as const, status: 404 as const, message: "There is no invitation of yours with this number; it may have been answered already." };
    if (!accept) {
      await invitation.destroy({ transaction });
      await recordAudit({ actorId: user.id, action: "course-invitation.declined", entityType: "course_invitation", entityId: invitation.id, before: { courseId: course.id, role: invitation.role } }, transaction);
      return { ok: true as const, message: `You declined the invitation to ${course.code}.`, courseId: course.id };
    }
    if (course.archivedAt) return { ok: false as const, status: 409 as const, message: `${course.code} is in the archive, so nobody can join it now.` };
    const existing = await CourseMembership.findOne({ where: { courseId: course.id, userId: user.id }, transaction });
    const notes: string[] = [];
    if (!existing) {
      // a student ID another member took since the invitation stays with them
      const taken = invitation.studentNumber ? await CourseMembership.count({ where: { courseId: course.id, studentNumber: invitation.studentNumber }, transaction }) : 0;
      if (taken) notes.push(`student ID ${invitation.studentNumber} is held by another member, so yours was left empty; tell your instructor`);
      const m = await CourseMembership.create({ courseId: course.id, userId: user.id, role: invitation.role, studentNumber: taken ? null : invitation.studentNumber }, { transaction });
      await recordAudit({ actorId: user.id, action: "membership.added", entityType: "course_membership", entityId: m.id, after: { courseId: course.id, userId: user.id, role: invitation.role, via: "course-invitation", invitedById: invitation.invitedById } }, transaction);
      if (invitation.groupName && invitation.role === "student") await joinNamedGroup(user, course.id, invitation.groupName, transaction);
    }
    await invitation.destroy({ transaction });
    const more = notes.length ? ` (${notes.join("; ")})` : "";
    return { ok: true as const, message: `You joined ${course.code} ${course.title}${more}.`, courseId: course.id };
  });
}

async function joinNamedGroup(user: User, courseId: number, name: string, transaction: Transaction) {
  if (await GroupMember.count({ where: { courseId, userId: user.id }, transaction })) return;
  const [group] = await Group.findOrCreate({ where: { courseId, name }, defaults: { courseId, name }, transaction });
  await GroupMember.create({ groupId: group.id, courseId, userId: user.id }, { transaction });
}
