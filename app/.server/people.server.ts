// Invitations, password resets and role changes. Each change of a role is audited in the
// same transaction as the change.
import type { Transaction } from "sequelize";
import { sequelize, User, Course, CourseMembership, type CourseRole, type Role, type TokenPurpose, COURSE_ROLES, ROLES, ROLE_LABELS } from "./db/models.server";
import { issueToken, checkToken, consumeToken, tokenMessage } from "./tokens.server";
import { checkNewPassword, hashPassword, verifyPassword } from "./passwords.server";
import { recordAudit } from "./audit.server";
import { queueMail } from "./mail/outbox.server";
import { enqueue } from "./jobs/queue.server";
import { emailProblem, normaliseEmail } from "./auth.server";
import { endSessionsOf } from "./session.server";
import { liftSignInLock } from "./throttle.server";
import { revokeAllApiTokensOf } from "./api-tokens.server";

export type FieldErrors = Partial<Record<string, string>>;
export type Outcome<T = undefined> = { ok: true; value: T } | { ok: false; errors: FieldErrors };

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
  const badEmail = emailProblem(email, "the person's");
  if (badEmail) errors.email = badEmail;
  if (!displayName) errors.displayName = "Enter the name to show for this person.";
  else if (displayName.length > 120) errors.displayName = "Use at most 120 characters.";
  if (!COURSE_ROLES.includes(role)) errors.role = `Choose one of: ${COURSE_ROLES.join(", ")}.`;
  const course = await Course.findByPk(courseId);
  if (!course) errors.form = "That course no longer exists.";
  if (Object.keys(errors).length) return { ok: false, errors };

  let invited = false;
  await sequelize.transaction(async (transaction) => {
    let user = await User.findOne({ where: { email }, transaction });
    if (!user) {
      // A person new to Ratebook is a member; one invited to teach may also create courses.
      const accountRole: Role = role === "instructor" ? "course-creator" : "member";
      user = await User.create({ email, displayName, role: accountRole, passwordHash: null }, { transaction });
      await recordAudit({ actorId: actor.id, action: "user.invited", entityType: "user", entityId: user.id, after: { email, role: user.role } }, transaction);
    }
    const existing = await CourseMembership.findOne({ where: { courseId, userId: user.id }, transaction });
    if (existing) {
      await setMembershipRole(actor, existing, role, transaction);
    } else {
      const m = await CourseMembership.create({ courseId, userId: user.id, role }, { transaction });
      await recordAudit({ actorId: actor.id, action: "membership.added", entityType: "course_membership", entityId: m.id, after: { courseId, userId: user.id, role } }, transaction);
    }
    if (!user.passwordHash) {
      const token = await issueToken(user.id, "invitation", actor.id, transaction);
      // The mail is a job in this transaction: sent by a worker, never inside the request.
      await queueMail(email, "invitation", { name: displayName, inviter: actor.displayName, courseCode: course!.code, courseTitle: course!.title, role, token }, { transaction });
      invited = true;
    }
  });

  return { ok: true, value: { invited } };
}

/**
 * Uses a one-time token to set a password: the token is checked first, then the fields, then the
 * token is consumed and `apply` runs in one transaction (a concurrent second use fails).
 */
async function redeemToken(
  rawToken: string,
  purpose: TokenPurpose,
  input: { password: unknown; confirm: unknown },
  fieldErrors: FieldErrors,
  apply: (user: User, passwordHash: string, transaction: Transaction) => Promise<unknown>,
): Promise<Outcome<User>> {
  const check = await checkToken(rawToken, purpose);
  if (!check.ok) return { ok: false, errors: { form: check.message } };
  const password = String(input.password ?? "");
  const pwError = checkNewPassword(password, String(input.confirm ?? ""));
  const errors: FieldErrors = { ...fieldErrors, ...(pwError ? { password: pwError } : {}) };
  if (Object.keys(errors).length) return { ok: false, errors };
  const passwordHash = await hashPassword(password);
  const done = await sequelize.transaction(async (transaction) => {
    if (!(await consumeToken(check.token, transaction))) return false;
    await apply(check.user, passwordHash, transaction);
    return true;
  });
  if (!done) return { ok: false, errors: { form: tokenMessage(purpose, "used") } };
  return { ok: true, value: check.user };
}

/** Sets the password (and name) of an invited person and marks the invitation used. */
export function acceptInvitation(rawToken: string, input: { password: unknown; confirm: unknown; displayName?: unknown }): Promise<Outcome<User>> {
  const name = input.displayName === undefined ? null : String(input.displayName).trim();
  const fieldErrors: FieldErrors = name !== null && !name ? { displayName: "Enter your name." } : {};
  return redeemToken(rawToken, "invitation", input, fieldErrors, async (user, passwordHash, transaction) => {
    await user.update({ passwordHash, ...(name ? { displayName: name } : {}) }, { transaction });
    await recordAudit({ actorId: user.id, action: "user.invitation-accepted", entityType: "user", entityId: user.id }, transaction);
  });
}

/**
 * Asks for a reset link. The answer and the work are the same whether or not the address has
 * an account: one `password-reset` job is added either way, and the worker looks the account
 * up, makes the link and queues the mail (tasks/password-reset.server.ts). So neither the
 * answer nor its time tells whether an account exists, and a mail outage cannot break the form.
 * The caller limits how often this may be asked (throttle.server.ts).
 */
export async function requestPasswordReset(rawEmail: unknown): Promise<Outcome> {
  const email = normaliseEmail(rawEmail);
  const badEmail = emailProblem(email);
  if (badEmail) return { ok: false, errors: { email: badEmail } };
  await enqueue("password-reset", { email });
  return { ok: true, value: undefined };
}

/** The worker's half of a reset request: a link and its mail for an account, nothing otherwise. */
export async function sendPasswordResetLink(email: string): Promise<boolean> {
  return sequelize.transaction(async (transaction) => {
    const user = await User.findOne({ where: { email }, transaction });
    if (!user) return false;
    const token = await issueToken(user.id, "password-reset", null, transaction);
    await queueMail(user.email, "password-reset", { name: user.displayName, token }, { transaction });
    return true;
  });
}

export async function resetPassword(rawToken: string, input: { password: unknown; confirm: unknown }): Promise<Outcome<User>> {
  const done = await redeemToken(rawToken, "password-reset", input, {}, async (user, passwordHash, transaction) => {
    await user.update({ passwordHash }, { transaction });
    // Whoever knew the old password is signed out everywhere, and the lock the sign-in page
    // recommended a reset for no longer stands in the way of the new password.
    await endSessionsOf(user.id, "password-reset", { transaction });
    await revokeAllApiTokensOf(user.id, "password-reset", transaction);
    await recordAudit({ actorId: user.id, action: "user.password-reset", entityType: "user", entityId: user.id }, transaction);
  });
  // the lock the sign-in page recommended a reset for no longer stands in the way of the new password
  if (done.ok) await liftSignInLock(done.value.email);
  return done;
}

const ROLE_RANK: Record<Role, number> = { member: 0, "course-creator": 1, admin: 2 };

/** Admin only: changes a person's Ratebook-wide role. */
export async function changeUserRole(actor: User, userId: number, rawRole: unknown): Promise<Outcome> {
  const role = String(rawRole ?? "") as Role;
  if (!ROLES.includes(role)) return { ok: false, errors: { role: `Choose one of: ${ROLES.map((r) => ROLE_LABELS[r]).join(", ")}.` } };
  if (actor.id === userId && role !== "admin") return { ok: false, errors: { role: "You cannot remove your own admin role; ask another admin." } };
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction, lock: true });
    if (!user) return { ok: false as const, errors: { form: "That person no longer exists." } };
    if (user.role === role) return { ok: true as const, value: undefined };
    const before = { role: user.role };
    await user.update({ role }, { transaction });
    // Taking powers away signs the person out everywhere; a promotion needs no new sign-in.
    // Its API tokens end too (they were made with the powers the account had).
    if (ROLE_RANK[role] < ROLE_RANK[before.role]) {
      await endSessionsOf(user.id, "role-changed", { transaction });
      await revokeAllApiTokensOf(user.id, "role-lowered", transaction);
    }
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
    await setMembershipRole(actor, m, role, transaction);
    return { ok: true as const, value: undefined };
  });
}

/** Changes a course role and audits it in the caller's transaction; no-op when unchanged. */
async function setMembershipRole(actor: User, m: CourseMembership, role: CourseRole, transaction: Transaction) {
  if (m.role === role) return;
  const before = { role: m.role };
  await m.update({ role }, { transaction });
  await recordAudit({ actorId: actor.id, action: "membership.role-changed", entityType: "course_membership", entityId: m.id, before, after: { role } }, transaction);
}

/** A signed-in person changes their own password; the current one must be given. */
export async function changeOwnPassword(
  user: User,
  input: { current: unknown; password: unknown; confirm: unknown },
  /** the caller's own session, which stays signed in; every other one ends */
  keepSessionId?: number,
): Promise<Outcome> {
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
    await endSessionsOf(user.id, "password-changed", { exceptId: keepSessionId, transaction });
    await revokeAllApiTokensOf(user.id, "password-changed", transaction);
    await recordAudit({ actorId: user.id, action: "user.password-changed", entityType: "user", entityId: user.id }, transaction);
  });
  return { ok: true, value: undefined };
}

/** Admin only: removes an account; its sessions, memberships and open links go with it (audited). */
export async function removeAccount(actor: User, userId: number): Promise<Outcome> {
  if (actor.id === userId) return { ok: false, errors: { form: "You cannot remove your own account; ask another admin." } };
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction, lock: true });
    if (!user) return { ok: false as const, errors: { form: "That person no longer exists." } };
    const before = { email: user.email, displayName: user.displayName, role: user.role };
    await endSessionsOf(user.id, "account-removed", { transaction });
    await user.destroy({ transaction });
    await recordAudit({ actorId: actor.id, action: "user.removed", entityType: "user", entityId: userId, before }, transaction);
    return { ok: true as const, value: undefined };
  });
}
