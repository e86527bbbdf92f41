// Who an institution sign-in is in Ratebook. No account is ever made here: a person must
// already be invited or on a roster. The first sign-in links the institution identity to that
// account, by the e-mail the institution has verified, or else by the institution id the roster
// holds (course_memberships.student_number, matched against the claim OIDC_ID_CLAIM names).
import { Op, QueryTypes } from "sequelize";
import { sequelize, User } from "../db/models.server";
import { UserIdentity } from "../db/user-identity.server";
import { recordAudit } from "../audit.server";
import { normaliseEmail } from "~/lib/email-address";
import type { InstitutionPerson } from "./oidc.server";

export type AccountMatch =
  | { ok: true; user: User; linkedNow: boolean; linkedBy: "email" | "institution-id" | null }
  | { ok: false; reason: "unknown" | "unverified-email" | "ambiguous-id"; email: string | null };

export async function accountForInstitutionPerson(person: InstitutionPerson, now = new Date()): Promise<AccountMatch> {
  return sequelize.transaction(async (transaction) => {
    const known = await UserIdentity.findOne({ where: { issuer: person.issuer, subject: person.subject }, transaction });
    if (known) {
      const user = await User.findByPk(known.userId, { transaction });
      if (user) {
        await known.update({ lastUsedAt: now }, { transaction });
        return { ok: true, user, linkedNow: false, linkedBy: null };
      }
    }

    let user: User | null = null;
    let linkedBy: "email" | "institution-id" = "email";
    const email = person.email ? normaliseEmail(person.email) : null;
    // An unverified address is never used to pick an account: anyone could type it at some providers.
    if (email && person.emailVerified) user = await User.findOne({ where: { email }, transaction });
    if (!user && person.institutionId) {
      const rows = await sequelize.query<{ userId: number }>(
        `select distinct user_id as "userId" from course_memberships where student_number = $1`,
        { bind: [person.institutionId], type: QueryTypes.SELECT, transaction },
      );
      if (rows.length > 1) return { ok: false, reason: "ambiguous-id", email };
      if (rows.length === 1) {
        user = await User.findByPk(rows[0].userId, { transaction });
        linkedBy = "institution-id";
      }
    }
    if (!user) return { ok: false, reason: email && !person.emailVerified ? "unverified-email" : "unknown", email };

    // One identity per account per institution: a second identity for the same account (say a
    // renamed account at the institution) replaces the first, audited.
    const previous = await UserIdentity.findOne({ where: { userId: user.id, issuer: person.issuer, subject: { [Op.ne]: person.subject } }, transaction });
    if (previous) await previous.destroy({ transaction });
    const identity = await UserIdentity.create(
      { userId: user.id, issuer: person.issuer, subject: person.subject, linkedBy, email, lastUsedAt: now },
      { transaction },
    );
    await recordAudit(
      {
        actorId: user.id,
        action: "user.sso-linked",
        entityType: "user",
        entityId: user.id,
        before: previous ? { issuer: previous.issuer, subject: previous.subject } : null,
        after: { issuer: identity.issuer, subject: identity.subject, linkedBy, email },
      },
      transaction,
    );
    return { ok: true, user, linkedNow: true, linkedBy };
  });
}

// Staff keep password sign-in: admins, course creators, and whoever teaches or demonstrates anywhere.
const NOT_STAFF = `u.role = 'member' and not exists (
  select 1 from course_memberships s where s.user_id = u.id and s.role in ('instructor', 'demonstrator'))`;

/** The code of a live course that asks this person (a student in it) to sign in through the institution, or null. */
export async function courseRequiringSso(userId: number): Promise<string | null> {
  const [row] = await sequelize.query<{ code: string }>(
    `select c.code from course_memberships m join courses c on c.id = m.course_id join users u on u.id = m.user_id
      where m.user_id = $1 and m.role = 'student' and c.sso_required and c.archived_at is null and ${NOT_STAFF}
      order by c.code limit 1`,
    { bind: [userId], type: QueryTypes.SELECT },
  );
  return row?.code ?? null;
}

/**
 * An instructor's switch: students of the course sign in through the institution only. Turning it
 * on ends the students' live password sessions at once (staff keep theirs).
 */
export async function setCourseSsoRequired(actorId: number, courseId: number, required: boolean): Promise<{ endedSessions: number }> {
  return sequelize.transaction(async (transaction) => {
    const [rows] = await sequelize.query(`update courses set sso_required = $1, updated_at = now() where id = $2 and sso_required <> $1 returning id`, { bind: [required, courseId], transaction });
    if ((rows as unknown[]).length === 0) return { endedSessions: 0 };
    await recordAudit({ actorId, action: required ? "course.sso-required" : "course.sso-optional", entityType: "course", entityId: courseId, before: { ssoRequired: !required }, after: { ssoRequired: required } }, transaction);
    if (!required) return { endedSessions: 0 };
    const students = await sequelize.query<{ userId: number }>(
      `select m.user_id as "userId" from course_memberships m join users u on u.id = m.user_id
        where m.course_id = $1 and m.role = 'student' and ${NOT_STAFF}`,
      { bind: [courseId], type: QueryTypes.SELECT, transaction },
    );
    let ended = 0;
    for (const s of students) ended += await endPasswordSessions(s.userId, transaction);
    return { endedSessions: ended };
  });
}

async function endPasswordSessions(userId: number, transaction: import("sequelize").Transaction) {
  const [rows] = await sequelize.query(
    `update user_sessions set ended_at = now(), ended_reason = 'sso-required' where user_id = $1 and ended_at is null and via = 'password' returning id`,
    { bind: [userId], transaction },
  );
  return (rows as unknown[]).length;
}
