import { data, Form, Link } from "react-router";
import type { Route } from "./+types/dashboard";
import { isCourseStaffSomewhere, requireUser } from "~/.server/guards.server";
import { coursesFor, type CourseSummary } from "~/.server/courses.server";
import { liveFigures } from "~/.server/dashboard/live.server";
import { PageTitle, TableBox } from "~/components/page";
import { LivePracticals } from "~/components/live-practicals";
import { nextSteps, type NextStep } from "~/.server/dashboard/next-steps.server";
import { formatDateTime, formatDay } from "~/lib/dates";
import { groupLabel, upperFirst } from "~/lib/natural-order";
import { fixed } from "~/lib/planning/format";
import { trailFor } from "~/lib/place";
import { readForm } from "~/.server/body.server";
import { formId } from "~/.server/ids.server";
import { answerCourseInvitation, openInvitationsFor, type OpenInvitation } from "~/.server/course-invitations.server";
import { Button, FormMessage } from "~/components/form";

export const meta: Route.MetaFunction = () => [{ title: "Dashboard · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  // Course staff see their practicals open for uploads, kept fresh by polling; students do not.
  const live = (await isCourseStaffSomewhere(user)) ? await liveFigures(user) : null;
  return { role: user.role, name: user.displayName, courses: await coursesFor(user), live, next: await nextSteps(user), invitations: await openInvitationsFor(user) };
}

// Answering one's own course invitation (people with an account are invited, never enrolled).
export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  if (intent !== "accept-invitation" && intent !== "decline-invitation") return data({ ok: false, message: `Unknown action "${intent}".` }, { status: 400 });
  const id = formId(form, "invitationId");
  if (id === null) return data({ ok: false, message: "The invitation number is missing or malformed." }, { status: 400 });
  const r = await answerCourseInvitation(user, id, intent === "accept-invitation");
  if (!r.ok) return data({ ok: false, message: r.message }, { status: r.status });
  return data({ ok: true, message: r.message });
}

function Invitations({ invitations }: { invitations: OpenInvitation[] }) {
  return (
    <section aria-labelledby="invitations-h" className="mb-8">
      <h2 id="invitations-h" className="mb-3 text-xl font-bold">Invitations to courses</h2>
      <ul className="grid gap-3">
        {invitations.map((i) => (
          <li key={i.id} className="flex flex-wrap items-center gap-3 rounded border border-rule bg-white p-4">
            <p className="min-w-0 flex-1">
              <strong>{i.courseCode}</strong> {i.courseTitle} ({i.term}): as {i.role}{i.inviter ? `, invited by ${i.inviter}` : ""}.
            </p>
            <Form method="post" className="flex gap-2">
              <input type="hidden" name="invitationId" value={i.id} />
              <Button name="intent" value="accept-invitation">Join {i.courseCode}</Button>
              <button type="submit" name="intent" value="decline-invitation" className="rounded border border-ink-soft px-4 py-2">Decline</button>
            </Form>
          </li>
        ))}
      </ul>
    </section>
  );
}

const INTRO: Record<string, string> = {
  admin: "You can see every course, manage people and account types, read the mail Ratebook sent, and check the audit log.",
  "course-creator": "Your courses. Open one to manage who takes part; practicals, marking and the gradebook build on these.",
  member: "The courses you take part in. What you can do in each follows your role there.",
};

function CourseTable({ courses, label }: { courses: CourseSummary[]; label: string }) {
  return (
    <TableBox label={label}>
      <table className="w-full border-collapse text-left">
        <thead>
          <tr className="border-b-2 border-ink">
            <th className="px-3 py-2">Code</th>
            <th className="px-3 py-2">Title</th>
            <th className="px-3 py-2">Term</th>
            <th className="px-3 py-2">Your role</th>
            <th className="num px-3 py-2">Instructors</th>
            <th className="num px-3 py-2">Demonstrators</th>
            <th className="num px-3 py-2">Students</th>
          </tr>
        </thead>
        <tbody>
          {courses.map((c) => (
            <tr key={c.id} className="border-b border-rule">
              <td className="px-3 py-2 whitespace-nowrap"><Link className="font-bold text-accent underline" to={`/courses/${c.id}`}>{c.code}</Link></td>
              <td className="px-3 py-2">{c.title}</td>
              <td className="px-3 py-2">{c.term}</td>
              <td className="px-3 py-2">{c.myRole ?? <span className="text-ink-soft">not a member</span>}</td>
              <td className="num px-3 py-2">{c.memberCounts.instructor}</td>
              <td className="num px-3 py-2">{c.memberCounts.demonstrator}</td>
              <td className="num px-3 py-2">{c.memberCounts.student}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}

const UPLOAD_STATE: Record<NextStep["upload"]["state"], string> = {
  none: "Nothing uploaded yet.",
  received: "received, waiting to be marked.",
  marked: "marked; the mark is shown when your instructor releases the marks.",
  refused: "refused: the file could not be read.",
  released: "marked and released: read your mark and feedback.",
};

/** A student's next step per practical: where to stand, what to mix, where to upload and by when. */
function NextSteps({ steps }: { steps: NextStep[] }) {
  return (
    <section aria-labelledby="next-h" className="mb-8">
      <h2 id="next-h" className="mb-3 text-xl font-bold">What to do next</h2>
      <ul className="grid gap-4 md:grid-cols-2">
        {steps.map((s) => (
          <li key={`${s.sessionId}-${s.groupId}`} className="rounded border border-rule bg-white p-4">
            <h3 className="text-lg font-bold">
              <Link className="underline" to={`/sessions/${s.sessionId}`}>{s.practical}</Link> <span className="font-normal text-ink-soft">({s.courseCode}, {formatDay(s.date)})</span>
            </h3>
            <p>{upperFirst(groupLabel(s.group))} · bench {s.bench} · feed CA0 {fixed(s.feed.CA0, 4)} mol/L, CB0 {fixed(s.feed.CB0, 4)} mol/L at {fixed(s.feed.temperatureC, 1)} °C</p>
            <p>Deadline: {s.deadline ? formatDateTime(s.deadline, s.timeZone) : "none set"}</p>
            <p>
              Your latest upload{s.upload.version ? ` (version ${s.upload.version}, ${formatDateTime(s.upload.submittedAt)})` : ""}: {s.upload.version ? UPLOAD_STATE[s.upload.state] : UPLOAD_STATE.none}
            </p>
            {s.upload.reasons.length ? (
              <ul className="ml-5 list-disc text-sm text-warn">{s.upload.reasons.map((r) => <li key={r}>{r}</li>)}</ul>
            ) : null}
            <p className="mt-2 flex flex-wrap gap-3">
              <Link className="rounded bg-accent px-3 py-1 font-bold text-accent-ink" to={`/groups/${s.groupId}/submissions`}>
                {s.upload.state === "released" ? "Marks and uploads" : "Upload readings"}
              </Link>
              <Link className="rounded border border-ink-soft px-3 py-1" to={`/sessions/${s.sessionId}/benches/${s.benchId}/sheet`}>Bench sheet</Link>
            </p>
          </li>
        ))}
      </ul>
    </section>
  );
}

export default function Dashboard({ loaderData, actionData }: Route.ComponentProps) {
  const { role, name, courses, live, next, invitations } = loaderData;
  const current = courses.filter((c) => !c.archived);
  const archived = courses.filter((c) => c.archived);
  const mayCreate = role === "course-creator" || role === "admin";
  return (
    <>
      <PageTitle trail={trailFor(null)} sub={INTRO[role]}>Hello, {name}</PageTitle>
      {actionData ? <FormMessage tone={actionData.ok ? "info" : "error"}>{actionData.message}</FormMessage> : null}
      {invitations.length ? <Invitations invitations={invitations} /> : null}
      {next.length ? <NextSteps steps={next} /> : null}
      {live ? <LivePracticals initial={live} /> : null}
      <section aria-labelledby="courses-h">
        <div className="mb-3 flex flex-wrap items-baseline gap-x-4">
          <h2 id="courses-h" className="text-xl font-bold">Courses</h2>
          {mayCreate ? <Link to="/courses/new" className="text-accent underline">Create a course</Link> : null}
        </div>
        {current.length === 0 ? (
          <p className="rounded border border-dashed border-rule p-6 text-ink-soft">
            {mayCreate ? "No courses yet. Create the first one to invite demonstrators and students." : "You are not in any course yet. Your instructor adds you by e-mail."}
          </p>
        ) : (
          <CourseTable courses={current} label="Courses" />
        )}
      </section>
      {archived.length ? (
        <section aria-labelledby="archived-h" className="mt-8">
          <h2 id="archived-h" className="mb-3 text-xl font-bold">Archived courses</h2>
          <CourseTable courses={archived} label="Archived courses" />
        </section>
      ) : null}
    </>
  );
}
