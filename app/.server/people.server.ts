// Invitations, password resets and role changes. Each change of a role is audited in the
// same transaction as the change.
import { sequelize, User, Course, CourseMembership, type CourseRole, type Role, COURSE_ROLES, ROLES } from "./db/models.server";
import { issueToken, checkToken, consumeToken } from "./tokens.server";
import { checkNewPassword, hashPassword, verifyPassword } from "./passwords.server";
import { recordAudit } from "./audit.server";
import { sendMail } from "./mail.server";
import { config } from "./config.server";
import { EMAIL_PATTERN, normaliseEmail } from "./auth.server";

export type FieldErrors = Partial<Record<string, string>>;
export type Outcome<T = undefined> = { ok: true; value: T } | { ok: false; errors: FieldErrors };

// A global role that fits a course role, for people who are new to Ratebook.
const GLOBAL_ROLE_FOR: Record<CourseRole, Role> = {
  instructor: "instructor",
  demonstrator: "demonstrator",
  student: "student",
};

export interface InvitationInput {
  email: unknown;
  displayName: unknown;
  role: unknown;
}

/** Adds a person to a course; a person new to Ratebook also gets an account and an invitation e-mail. */
export async function inviteToCourse(actor: User, courseId: number, input: InvitationInput): Promise<Outcome<{ invited: boolean }>> {
  const email = normaliseEmail(input.email);
  const displayName = String(input.displayName ?? "").trim();
  const role = String(input.role ?? "") as CourseRole;
  const errors: FieldErrors = {};
  if (!email) errors.email = "Enter the person's e-mail address.";
  else if (!EMAIL_PATTERN.test(email) || email.length > 254) errors.email = "That does not look like an e-mail address.";
  if (!displayName) errors.displayName = "Enter the name to show for this person.";
  else if (displayName.length > 120) errors.displayName = "Use at most 120 characters.";
  if (!COURSE_ROLES.includes(role)) errors.role = `Choose one of: ${COURSE_ROLES.join(", ")}.`;
  const course = await Course.findByPk(courseId);
  if (!course) errors.form = "That course no longer exists.";
  if (Object.keys(errors).length) return { ok: false, errors };

  let token: string | null = null;
  await sequelize.transaction(async (transaction) => {
    let user = await User.findOne({ where: { email }, transaction });
    if (!user) {
      user = await User.create({ email, displayName, role: GLOBAL_ROLE_FOR[role], passwordHash: null }, { transaction });
      await recordAudit({ actorId: actor.id, action: "user.invited", entityType: "user", entityId: user.id, after: { email, role: user.role } }, transaction);
    }
    const existing = await CourseMembership.findOne({ where: { courseId, userId: user.id }, transaction });
    if (existing) {
      if (existing.role !== role) {
        const before = { role: existing.role };
        await existing.update({ role }, { transaction });
        await recordAudit({ actorId: actor.id, action: "membership.role-changed", entityType: "course_membership", entityId: existing.id, before, after: { role } }, transaction);
      }
    } else {
      const m = await CourseMembership.create({ courseId, userId: user.id, role }, { transaction });
      await recordAudit({ actorId: actor.id, action: "membership.added", entityType: "course_membership", entityId: m.id, after: { courseId, userId: user.id, role } }, transaction);
    }
    if (!user.passwordHash) token = await issueToken(user.id, "invitation", actor.id, transaction);
  });

  if (token) {
    await sendMail({
      to: email,
      subject: `You are invited to ${course!.code} on Ratebook`,
      text:
        `Hello ${displayName},\n\n${actor.displayName} has added you to ${course!.code} ${course!.title} as ${role}.\n` +
        `Choose your password here (the link works once and for 7 days):\n\n${config.appUrl}/invitation/${token}\n\n` +
        `If you did not expect this, ignore this message.\n`,
    });
  }
  return { ok: true, value: { invited: token !== null } };
}

/** Sets the password of an invited person and marks the invitation used. */
export async function acceptInvitation(rawToken: string, input: { password: unknown; confirm: unknown; displayName?: unknown }): Promise<Outcome<User>> {
  const password = String(input.password ?? "");
  const pwError = checkNewPassword(password, String(input.confirm ?? ""));
  const name = input.displayName === undefined ? null : String(input.displayName).trim();
  const errors: FieldErrors = {};
  if (pwError) errors.password = pwError;
  if (name !== null && !name) errors.displayName = "Enter your name.";
  const check = await checkToken(rawToken, "invitation");
  if (!check.ok) return { ok: false, errors: { form: check.message } };
  if (Object.keys(errors).length) return { ok: false, errors };
  const passwordHash = await hashPassword(password);
  const done = await sequelize.transaction(async (transaction) => {
    if (!(await consumeToken(check.token, transaction))) return false;
    await check.user.update({ passwordHash, ...(name ? { displayName: name } : {}) }, { transaction });
    await recordAudit({ actorId: check.user.id, action: "user.invitation-accepted", entityType: "user", entityId: check.user.id }, transaction);
    return true;
  });
  if (!done) return { ok: false, errors: { form: "This invitation has already been accepted. Sign in with your e-mail and password." } };
  return { ok: true, value: check.user };
}

/** Always reports success to the caller, so the form cannot be used to find accounts. */
export async function requestPasswordReset(rawEmail: unknown): Promise<Outcome> {
  const email = normaliseEmail(rawEmail);
  if (!email) return { ok: false, errors: { email: "Enter your e-mail address." } };
  if (!EMAIL_PATTERN.test(email)) return { ok: false, errors: { email: "That does not look like an e-mail address." } };
  const user = await User.findOne({ where: { email } });
  if (user) {
    const token = await issueToken(user.id, "password-reset", null);
    await sendMail({
      to: email,
      subject: "Reset your Ratebook password",
      text:
        `Hello ${user.displayName},\n\nSomeone asked to reset the password of this Ratebook account.\n` +
        `Choose a new password here (the link works once and for one hour):\n\n${config.appUrl}/password/reset/${token}\n\n` +
        `If it was not you, ignore this message: your password stays as it is.\n`,
    });
  }
  return { ok: true, value: undefined };
}

export async function resetPassword(rawToken: string, input: { password: unknown; confirm: unknown }): Promise<Outcome<User>> {
  const check = await checkToken(rawToken, "password-reset");
  if (!check.ok) return { ok: false, errors: { form: check.message } };
  const password = String(input.password ?? "");
  const pwError = checkNewPassword(password, String(input.confirm ?? ""));
  if (pwError) return { ok: false, errors: { password: pwError } };
  const passwordHash = await hashPassword(password);
  const done = await sequelize.transaction(async (transaction) => {
    if (!(await consumeToken(check.token, transaction))) return false;
    await check.user.update({ passwordHash }, { transaction });
    await recordAudit({ actorId: check.user.id, action: "user.password-reset", entityType: "user", entityId: check.user.id }, transaction);
    return true;
  });
  if (!done) return { ok: false, errors: { form: "This reset link has already been used. Ask for a new one if you still need it." } };
  return { ok: true, value: check.user };
}

/** Admin only: changes a person's Ratebook-wide role. */
export async function changeUserRole(actor: User, userId: number, rawRole: unknown): Promise<Outcome> {
  const role = String(rawRole ?? "") as Role;
  if (!ROLES.includes(role)) return { ok: false, errors: { role: `Choose one of: ${ROLES.join(", ")}.` } };
  if (actor.id === userId && role !== "admin") return { ok: false, errors: { role: "You cannot remove your own admin role; ask another admin." } };
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction, lock: true });
    if (!user) return { ok: false as const, errors: { form: "That person no longer exists." } };
    if (user.role === role) return { ok: true as const, value: undefined };
    const before = { role: user.role };
    await user.update({ role }, { transaction });
    await recordAudit({ actorId: actor.id, action: "user.role-changed", entityType: "user", entityId: user.id, before, after: { role } }, transaction);
    return { ok: true as const, value: undefined };
  });
}

/** Instructor of the course (or admin): changes someone's role in it. */
export async function changeMembershipRole(actor: User, courseId: number, membershipId: number, rawRole: unknown): Promise<Outcome> {
  const role = String(rawRole ?? "") as CourseRole;
  if (!COURSE_ROLES.includes(role)) return { ok: false, errors: { role: `Choose one of: ${COURSE_ROLES.join(", ")}.` } };
  return sequelize.transaction(async (transaction) => {
    const m = await CourseMembership.findOne({ where: { id: membershipId, courseId }, transaction, lock: true });
    if (!m) return { ok: false as const, errors: { form: "That person is no longer in this course." } };
    if (m.role === role) return { ok: true as const, value: undefined };
    if (m.userId === actor.id && m.role === "instructor") {
      const instructors = await CourseMembership.count({ where: { courseId, role: "instructor" }, transaction });
      if (instructors <= 1) return { ok: false as const, errors: { role: "A course needs at least one instructor; add another before changing your own role." } };
    }
    const before = { role: m.role };
    await m.update({ role }, { transaction });
    await recordAudit({ actorId: actor.id, action: "membership.role-changed", entityType: "course_membership", entityId: m.id, before, after: { role } }, transaction);
    return { ok: true as const, value: undefined };
  });
}

/** A signed-in person changes their own password; the current one must be given. */
export async function changeOwnPassword(user: User, input: { current: unknown; password: unknown; confirm: unknown }): Promise<Outcome> {
  const current = String(input.current ?? "");
  const password = String(input.password ?? "");
  const errors: FieldErrors = {};
  if (!current) errors.current = "Enter your current password.";
  else if (!(await verifyPassword(current, user.passwordHash))) errors.current = "That is not your current password.";
  const pwError = checkNewPassword(password, String(input.confirm ?? ""));
  if (pwError) errors.password = pwError;
  else if (password === current) errors.password = "Choose a password different from the current one.";
  if (Object.keys(errors).length) return { ok: false, errors };
  const passwordHash = await hashPassword(password);
  await sequelize.transaction(async (transaction) => {
    await user.update({ passwordHash }, { transaction });
    await recordAudit({ actorId: user.id, action: "user.password-changed", entityType: "user", entityId: user.id }, transaction);
  });
  return { ok: true, value: undefined };
}
