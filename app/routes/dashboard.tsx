import { Link } from "react-router";
import type { Route } from "./+types/dashboard";
import { isCourseStaffSomewhere, requireUser } from "~/.server/guards.server";
import { coursesFor, type CourseSummary } from "~/.server/courses.server";
import { liveFigures } from "~/.server/dashboard/live.server";
import { PageTitle, TableBox } from "~/components/page";
import { LivePracticals } from "~/components/live-practicals";

export const meta: Route.MetaFunction = () => [{ title: "Dashboard · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  // Course staff see their practicals open for uploads, kept fresh by polling; students do not.
  const live = (await isCourseStaffSomewhere(user)) ? await liveFigures(user) : null;
  return { role: user.role, name: user.displayName, courses: await coursesFor(user), live };
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

export default function Dashboard({ loaderData }: Route.ComponentProps) {
  const { role, name, courses, live } = loaderData;
  const current = courses.filter((c) => !c.archived);
  const archived = courses.filter((c) => c.archived);
  const mayCreate = role === "course-creator" || role === "admin";
  return (
    <>
      <PageTitle sub={INTRO[role]}>Hello, {name}</PageTitle>
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
