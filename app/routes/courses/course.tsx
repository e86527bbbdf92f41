import { data, Form, useNavigation } from "react-router";
import type { Route } from "./+types/course";
import { requireCourseRole, requireUser } from "~/.server/guards.server";
import { courseMembers } from "~/.server/courses.server";
import { changeMembershipRole, inviteToCourse, type FieldErrors } from "~/.server/people.server";
import { Course, COURSE_ROLES } from "~/.server/db/models.server";
import { Button, Field, FormMessage, SelectField } from "~/components/form";
import { PageTitle } from "~/components/page";
import { RoleSelect } from "~/components/role-select";
import { readForm } from "~/.server/body.server";
import { formId, pathId } from "~/.server/ids.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.course.code ?? "Course"} · Ratebook` }];

const NO_COURSE = "There is no course at this address.";

async function loadCourse(courseId: string) {
  const course = await Course.findByPk(pathId(courseId, NO_COURSE));
  if (!course) throw data({ message: NO_COURSE }, { status: 404 });
  return course;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const course = await loadCourse(params.courseId);
  const myRole = await requireCourseRole(user, course.id, COURSE_ROLES);
  const staffView = myRole !== "student";
  const members = (await courseMembers(course.id))
    .filter((m) => staffView || m.role !== "student" || m.userId === user.id)
    .map((m) => ({
      id: m.id,
      role: m.role,
      name: m.user!.displayName,
      email: staffView ? m.user!.email : null,
      pending: !m.user!.passwordHash,
      isMe: m.userId === user.id,
    }));
  return { course: { id: course.id, code: course.code, title: course.title, term: course.term }, myRole, members, roles: COURSE_ROLES };
}

type ActionResult = { intent: string; errors: FieldErrors; values: Record<string, string>; notice: string | null };

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const course = await loadCourse(params.courseId);
  await requireCourseRole(user, course.id, ["instructor"]);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const reply = (r: Omit<ActionResult, "intent">, status = 200) => data<ActionResult>({ intent, ...r }, { status });
  if (intent === "invite") {
    const result = await inviteToCourse(user, course.id, { email: form.get("email"), displayName: form.get("displayName"), role: form.get("role") });
    if (!result.ok) return reply({ errors: result.errors, values: Object.fromEntries(form) as Record<string, string>, notice: null }, 400);
    const notice = result.value.invited ? `Invitation sent to ${form.get("email")}.` : `${form.get("email")} already has an account and is now in this course.`;
    return reply({ errors: {}, values: {}, notice });
  }
  if (intent === "change-role") {
    const membershipId = formId(form, "membershipId");
    if (membershipId === null) return reply({ errors: { form: "That row does not name a person in this course; reload the page." }, values: {}, notice: null }, 400);
    const result = await changeMembershipRole(user, course.id, membershipId, form.get("role"));
    if (!result.ok) return reply({ errors: result.errors, values: {}, notice: null }, 400);
    return reply({ errors: {}, values: {}, notice: "Role changed." });
  }
  throw data({ message: `Unknown action "${String(intent)}".` }, { status: 400 });
}

export default function CoursePage({ loaderData, actionData }: Route.ComponentProps) {
  const { course, myRole, members, roles } = loaderData;
  const busy = useNavigation().state === "submitting";
  const inviteErrors: FieldErrors = actionData?.intent === "invite" ? actionData.errors : {};
  const values: Record<string, string> = actionData?.intent === "invite" ? actionData.values : {};
  const isInstructor = myRole === "instructor";
  return (
    <>
      <PageTitle sub={`${course.title}${course.term ? ` · ${course.term}` : ""} · your role: ${myRole}`}>{course.code}</PageTitle>
      {actionData?.notice && actionData.intent === "invite" ? <FormMessage tone="info">{actionData.notice}</FormMessage> : null}
      <div className="grid gap-8 lg:grid-cols-[2fr_1fr]">
        <section aria-labelledby="members-h">
          <h2 id="members-h" className="mb-3 text-xl font-bold">{myRole === "student" ? "Staff" : "People"} ({members.length})</h2>
          <table className="w-full border-collapse bg-white text-left">
            <thead>
              <tr className="border-b-2 border-ink">
                <th className="px-3 py-2">Name</th>
                {myRole !== "student" ? <th className="px-3 py-2">E-mail</th> : null}
                <th className="px-3 py-2">Role</th>
                <th className="px-3 py-2">Account</th>
              </tr>
            </thead>
            <tbody>
              {members.map((m) => (
                <tr key={m.id} className="border-b border-rule">
                  <td className="px-3 py-2">{m.name}{m.isMe ? " (you)" : ""}</td>
                  {myRole !== "student" ? <td className="px-3 py-2">{m.email}</td> : null}
                  <td className="px-3 py-2">
                    {isInstructor ? <RoleSelect id={`role-${m.id}`} label={`Role of ${m.name}`} role={m.role} roles={roles} fields={{ intent: "change-role", membershipId: m.id }} /> : m.role}
                  </td>
                  <td className="px-3 py-2">{m.pending ? "◔ invited, not yet joined" : "● active"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
        {isInstructor ? (
          <section aria-labelledby="invite-h" className="self-start rounded border border-rule bg-white p-4">
            <h2 id="invite-h" className="mb-3 text-xl font-bold">Add a person</h2>
            {inviteErrors.form ? <FormMessage tone="error">{inviteErrors.form}</FormMessage> : null}
            <Form method="post" noValidate>
              <input type="hidden" name="intent" value="invite" />
              <Field label="E-mail" name="email" type="email" defaultValue={values.email} error={inviteErrors.email} />
              <Field label="Name" name="displayName" defaultValue={values.displayName} error={inviteErrors.displayName} />
              <SelectField label="Role in this course" name="role" options={roles} defaultValue={values.role ?? "student"} error={inviteErrors.role} />
              <Button busy={busy}>Add and invite</Button>
            </Form>
            <p className="mt-3 text-sm text-ink-soft">People new to Ratebook get an e-mail with a link to choose a password; the link works once, for 7 days.</p>
          </section>
        ) : null}
      </div>
    </>
  );
}
