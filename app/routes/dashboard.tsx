import { Link } from "react-router";
import type { Route } from "./+types/dashboard";
import { requireUser } from "~/.server/guards.server";
import { coursesFor } from "~/.server/courses.server";
import { PageTitle } from "~/components/page";

export const meta: Route.MetaFunction = () => [{ title: "Dashboard · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { role: user.role, name: user.displayName, courses: await coursesFor(user) };
}

const INTRO: Record<string, string> = {
  admin: "You can see every course, manage people and roles, read the mail Ratebook sent, and check the audit log.",
  instructor: "Your courses. Open one to manage who takes part; practicals, marking and the gradebook build on these.",
  demonstrator: "The courses you help run.",
  student: "The courses you take part in. Your instructor sets up each practical.",
};

export default function Dashboard({ loaderData }: Route.ComponentProps) {
  const { role, name, courses } = loaderData;
  return (
    <>
      <PageTitle sub={INTRO[role]}>Hello, {name}</PageTitle>
      <section aria-labelledby="courses-h">
        <div className="mb-3 flex items-baseline gap-4">
          <h2 id="courses-h" className="text-xl font-bold">Courses</h2>
          {role === "instructor" || role === "admin" ? (
            <Link to="/courses/new" className="text-accent underline">Create a course</Link>
          ) : null}
        </div>
        {courses.length === 0 ? (
          <p className="rounded border border-dashed border-rule p-6 text-ink-soft">
            {role === "student" || role === "demonstrator"
              ? "You are not in any course yet. Your instructor adds you by e-mail."
              : "No courses yet. Create the first one to invite demonstrators and students."}
          </p>
        ) : (
          <table className="w-full border-collapse bg-white text-left">
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
                  <td className="px-3 py-2"><Link className="font-bold text-accent underline" to={`/courses/${c.id}`}>{c.code}</Link></td>
                  <td className="px-3 py-2">{c.title}</td>
                  <td className="px-3 py-2">{c.term}</td>
                  <td className="px-3 py-2">{c.myRole}</td>
                  <td className="num px-3 py-2">{c.memberCounts.instructor}</td>
                  <td className="num px-3 py-2">{c.memberCounts.demonstrator}</td>
                  <td className="num px-3 py-2">{c.memberCounts.student}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </>
  );
}
