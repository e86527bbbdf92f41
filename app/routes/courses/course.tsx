import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/course";
import { NO_COURSE, ownCourseRole, requireCourseRole, requireUser } from "~/.server/guards.server";
import { courseMembers, removeMember, setCourseArchived, setCourseTimeZone } from "~/.server/courses.server";
import { timeZoneNames } from "~/lib/time-zone";
import { changeMembershipRole, inviteToCourse, type FieldErrors } from "~/.server/people.server";
import { Course, COURSE_ROLES } from "~/.server/db/models.server";
import { readForm } from "~/.server/body.server";
import { formId, pathId } from "~/.server/ids.server";
import { Button, Field, FormMessage, SelectField } from "~/components/form";
import { PageTitle, TableBox } from "~/components/page";
import { RoleSelect } from "~/components/role-select";
import { courseSessions } from "~/.server/planning/sessions.server";
import { CoursePlanning } from "~/components/planning/course-planning";
import { trailFor } from "~/lib/place";
import { setCourseSsoRequired } from "~/.server/sso/accounts.server";
import { ssoConfig } from "~/.server/sso/oidc.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.course.code ?? "Course"} · Ratebook` }];

async function loadCourse(courseId: string) {
  const course = await Course.findByPk(pathId(courseId, NO_COURSE));
  if (!course) throw data({ message: NO_COURSE }, { status: 404 });
  return course;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const course = await loadCourse(params.courseId);
  // What the caller may do follows their course role (an admin acts as an instructor) ...
  const actingRole = await requireCourseRole(user, course.id, COURSE_ROLES);
  // ... but the page says what their own role is, which an admin who is not a member has not.
  const myRole = await ownCourseRole(user, course.id);
  const staffView = actingRole !== "student";
  const members = (await courseMembers(course.id))
    .filter((m) => staffView || m.role !== "student")
    .map((m) => ({
      id: m.id,
      role: m.role,
      name: m.user!.displayName,
      email: staffView ? m.user!.email : null,
      pending: !m.user!.passwordHash,
      isMe: m.userId === user.id,
    }));
  const sessions = await courseSessions(course.id);
  return {
    course: { id: course.id, code: course.code, title: course.title, term: course.term, archived: course.archivedAt !== null, ssoRequired: course.ssoRequired, timeZone: course.timeZone },
    ssoAvailable: ssoConfig() !== null,
    timeZones: actingRole === "instructor" ? timeZoneNames() : [],
    myRole,
    canManage: actingRole === "instructor",
    // copying makes a new course: the account must be one that may create courses
    mayCopy: actingRole === "instructor" && (user.role === "admin" || user.role === "course-creator"),
    staffView,
    members,
    roles: COURSE_ROLES,
    sessions,
  };
}

type ActionResult = { intent: string; errors: FieldErrors; values: Record<string, string>; notice: string | null; at?: number };

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const course = await loadCourse(params.courseId);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  // taking a course out of the archive is the one change an archived course accepts (the policy refuses the rest)
  await requireCourseRole(user, course.id, ["instructor"], false, { whileArchived: intent === "unarchive" || intent === "archive" });
  const reply = (r: Omit<ActionResult, "intent">, status = 200) => data<ActionResult>({ intent, ...r }, { status });
  const refuse = (message: string, status = 400) => reply({ errors: { form: message }, values: {}, notice: null }, status);
  if (intent === "unarchive" || intent === "archive") {
    const result = await setCourseArchived(user, course.id, intent === "archive");
    if (!result.ok) return reply({ errors: result.errors, values: {}, notice: null }, 400);
    return reply({ errors: {}, values: {}, notice: intent === "archive" ? "The course is archived: it is read-only until you take it out of the archive." : "The course is out of the archive." });
  }
  if (intent === "sso-required" || intent === "sso-optional") {
    const required = intent === "sso-required";
    if (required && !ssoConfig()) return refuse("Signing in with an institution is not set up on this Ratebook (OIDC_ISSUER is not set), so it cannot be required.");
    const { endedSessions } = await setCourseSsoRequired(user.id, course.id, required);
    return reply({
      errors: {},
      values: {},
      notice: required
        ? `Students of this course now sign in through their institution only${endedSessions ? `; ${endedSessions} password session${endedSessions === 1 ? " was" : "s were"} ended` : ""}. Staff keep their passwords.`
        : "Students of this course may sign in with a password again.",
    });
  }
  if (intent === "time-zone") {
    const result = await setCourseTimeZone(user, course.id, form.get("timeZone"));
    if (!result.ok) return reply({ errors: result.errors, values: {}, notice: null }, 400);
    return reply({ errors: {}, values: {}, notice: `Deadlines are now entered and shown on the ${form.get("timeZone")} clock. Deadlines already set keep their moment.` });
  }
  if (intent === "invite") {
    const result = await inviteToCourse(user, course.id, { email: form.get("email"), displayName: form.get("displayName"), role: form.get("role") });
    if (!result.ok) return reply({ errors: result.errors, values: Object.fromEntries(form) as Record<string, string>, notice: null }, 400);
    const notice = result.value.invited ? `Invitation sent to ${form.get("email")}.` : `${form.get("email")} already has an account and is now in this course.`;
    // `at` gives the invitation form a new key, so it comes back empty.
    return reply({ errors: {}, values: {}, notice, at: Date.now() });
  }
  if (intent === "change-role" || intent === "remove-member") {
    const membershipId = formId(form, "membershipId");
    if (membershipId === null) return refuse("That row does not name a person in this course; reload the page.");
    if (intent === "remove-member") {
      const result = await removeMember(user, course.id, membershipId);
      if (!result.ok) return reply({ errors: result.errors, values: {}, notice: null }, 400);
      return reply({ errors: {}, values: {}, notice: `${result.value.name} is no longer in this course.` });
    }
    const result = await changeMembershipRole(user, course.id, membershipId, form.get("role"));
    if (!result.ok) return reply({ errors: result.errors, values: {}, notice: null }, 400);
    return reply({ errors: {}, values: {}, notice: "Role changed." });
  }
  return refuse(`Unknown action "${intent}".`);
}

export default function CoursePage({ loaderData, actionData }: Route.ComponentProps) {
  const { course, myRole, canManage, staffView, members, roles } = loaderData;
  const busy = useNavigation().state === "submitting";
  const inviteErrors: FieldErrors = actionData?.intent === "invite" ? actionData.errors : {};
  const values: Record<string, string> = actionData?.intent === "invite" ? actionData.values : {};
  const editable = canManage && !course.archived;
  const roleText = myRole ? `your role: ${myRole}` : "you are not a member (you can manage it as administrator)";
  const pageNotice = actionData && actionData.intent !== "change-role" ? actionData.notice : null;
  const pageProblem = actionData && actionData.intent !== "invite" && actionData.intent !== "change-role" ? actionData.errors.form : undefined;
  return (
    <>
      <PageTitle trail={trailFor(null, course)} sub={`${course.title}${course.term ? ` · ${course.term}` : ""} · ${roleText}`}>
        {course.code}
        {course.archived ? <span className="ml-3 align-middle rounded border border-ink-soft px-2 py-0.5 text-base font-normal text-ink-soft">archived</span> : null}
      </PageTitle>
      {pageNotice ? <FormMessage tone="info">{pageNotice}</FormMessage> : null}
      {pageProblem ? <FormMessage tone="error">{pageProblem}</FormMessage> : null}
      <CoursePlanning courseId={course.id} role={canManage ? "instructor" : staffView ? "demonstrator" : "student"} sessions={loaderData.sessions} />
      {staffView ? (
        <nav aria-label="Marks downloads" className="-mt-4 mb-8 flex flex-wrap items-center gap-2">
          <span className="text-ink-soft">Every practical's marks, fits and readings:</span>
          {/* plain links: downloads are resource routes, not pages for the router to load */}
          <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/courses/${course.id}/export.xlsx`} download>Download workbook (.xlsx)</a>
          <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/courses/${course.id}/export.csv`} download>Marks (.csv)</a>
        </nav>
      ) : null}
      <div className="grid gap-8 lg:grid-cols-[2fr_1fr]">
        <section aria-labelledby="members-h" className="min-w-0">
          <h2 id="members-h" className="mb-3 text-xl font-bold">{staffView ? "People" : "Staff"} ({members.length})</h2>
          <TableBox label={staffView ? "People in this course" : "Staff of this course"}>
            <table className="w-full border-collapse text-left">
              <thead>
                <tr className="border-b-2 border-ink">
                  <th className="px-3 py-2">Name</th>
                  {staffView ? <th className="px-3 py-2">E-mail</th> : null}
                  <th className="px-3 py-2">Role</th>
                  {staffView ? <th className="px-3 py-2">Account</th> : null}
                  {editable ? <th className="px-3 py-2"><span className="sr-only">Remove</span></th> : null}
                </tr>
              </thead>
              <tbody>
                {members.map((m) => (
                  <tr key={m.id} className="border-b border-rule align-top">
                    <td className="px-3 py-2">{m.name}{m.isMe ? " (you)" : ""}</td>
                    {staffView ? <td className="px-3 py-2 whitespace-nowrap">{m.email}</td> : null}
                    <td className="px-3 py-2">
                      {editable ? <RoleSelect id={`role-${m.id}`} label={`Role of ${m.name}`} role={m.role} roles={roles} fields={{ intent: "change-role", membershipId: m.id }} /> : m.role}
                    </td>
                    {staffView ? <td className="px-3 py-2 whitespace-nowrap">{m.pending ? "◔ invited, not yet joined" : "● active"}</td> : null}
                    {editable ? (
                      <td className="px-3 py-2">
                        <Form method="post">
                          <input type="hidden" name="intent" value="remove-member" />
                          <input type="hidden" name="membershipId" value={m.id} />
                          <button type="submit" aria-label={`Remove ${m.name} from this course`} className="rounded border border-ink-soft px-2 py-1 text-sm whitespace-nowrap hover:bg-bad-soft">
                            Remove
                          </button>
                        </Form>
                      </td>
                    ) : null}
                  </tr>
                ))}
              </tbody>
            </table>
          </TableBox>
        </section>
        {canManage ? (
          <div className="min-w-0 space-y-6 self-start">
            {editable ? (
              <section aria-labelledby="invite-h" className="rounded border border-rule bg-white p-4">
                <h2 id="invite-h" className="mb-3 text-xl font-bold">Add a person</h2>
                {inviteErrors.form ? <FormMessage tone="error">{inviteErrors.form}</FormMessage> : null}
                <Form method="post" noValidate key={actionData?.intent === "invite" && actionData.at ? actionData.at : "invite"}>
                  <input type="hidden" name="intent" value="invite" />
                  <Field label="E-mail" name="email" type="email" defaultValue={values.email} error={inviteErrors.email} />
                  <Field label="Name" name="displayName" defaultValue={values.displayName} error={inviteErrors.displayName} />
                  <SelectField label="Role in this course" name="role" options={roles} defaultValue={values.role ?? "student"} error={inviteErrors.role} />
                  <Button busy={busy}>Add and invite</Button>
                </Form>
                <p className="mt-3 text-sm text-ink-soft">People new to Ratebook get an e-mail with a link to choose a password; the link works once, for 7 days.</p>
              </section>
            ) : null}
            {editable ? (
              <section aria-labelledby="zone-h" className="rounded border border-rule bg-white p-4">
                <h2 id="zone-h" className="mb-2 text-xl font-bold">Time zone</h2>
                <p className="mb-3 text-sm text-ink-soft">The lab's clock: deadlines are entered and shown in it. Now {course.timeZone}.</p>
                <Form method="post" noValidate>
                  <input type="hidden" name="intent" value="time-zone" />
                  <SelectField label="Time zone of this course" name="timeZone" options={loaderData.timeZones} defaultValue={course.timeZone} error={actionData?.intent === "time-zone" ? actionData.errors.timeZone : undefined} />
                  <Button busy={busy}>Save time zone</Button>
                </Form>
              </section>
            ) : null}
            {loaderData.mayCopy ? (
              <section aria-labelledby="copy-h" className="rounded border border-rule bg-white p-4">
                <h2 id="copy-h" className="mb-2 text-xl font-bold">Next term</h2>
                <p className="mb-3 text-sm text-ink-soft">A new course with this one's staff, reaction systems and practicals, without its students and marks.</p>
                <Link className="inline-block rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/courses/${course.id}/copy`}>Copy to a new term</Link>
              </section>
            ) : null}
            {loaderData.ssoAvailable || course.ssoRequired ? (
              <section aria-labelledby="sso-h" className="rounded border border-rule bg-white p-4">
                <h2 id="sso-h" className="mb-2 text-xl font-bold">Institution sign-in</h2>
                <p className="mb-3 text-sm text-ink-soft">
                  {course.ssoRequired
                    ? "Students of this course sign in through their institution only; a password does not let them in. Staff may still use a password."
                    : "Students may sign in with a Ratebook password or through their institution. Requiring the institution ends students' password sessions at once."}
                </p>
                <Form method="post">
                  <input type="hidden" name="intent" value={course.ssoRequired ? "sso-optional" : "sso-required"} />
                  <button type="submit" className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft">
                    {course.ssoRequired ? "Let students use a password again" : "Require institution sign-in for students"}
                  </button>
                </Form>
              </section>
            ) : null}
            <section aria-labelledby="archive-h" className="rounded border border-rule bg-white p-4">
              <h2 id="archive-h" className="mb-2 text-xl font-bold">{course.archived ? "Archived" : "Archive"}</h2>
              <p className="mb-3 text-sm text-ink-soft">
                {course.archived
                  ? "Nothing in this course can be changed while it is archived. Take it out of the archive to change it again."
                  : "When the course has ended: it moves to the archived list and becomes read-only. Nothing is deleted."}
              </p>
              <Form method="post">
                <input type="hidden" name="intent" value={course.archived ? "unarchive" : "archive"} />
                <button type="submit" className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft">
                  {course.archived ? "Take out of the archive" : "Archive this course"}
                </button>
              </Form>
            </section>
          </div>
        ) : null}
      </div>
    </>
  );
}
