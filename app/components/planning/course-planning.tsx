// The course page's planning section: the practicals, and links to the roster, groups and the
// reaction-system library (staff).
import { Link } from "react-router";

interface Props {
  courseId: number;
  role: "instructor" | "demonstrator" | "student";
  sessions: Array<{ id: number; title: string; date: string; status: string; benchCount: number; slotMinutes: number }>;
}

export function CoursePlanning({ courseId, role, sessions }: Props) {
  const staff = role !== "student";
  return (
    <section aria-labelledby="practicals-h" className="mb-8">
      <h2 id="practicals-h" className="mb-3 text-xl font-bold">Practicals ({sessions.length})</h2>
      {sessions.length ? (
        <ul className="mb-3 space-y-2">
          {sessions.map((s) => (
            <li key={s.id} className="rounded border border-rule bg-white px-3 py-2">
              <Link className="font-bold underline" to={`/sessions/${s.id}`}>{s.title}</Link>{" "}
              <span className="text-ink-soft">· {s.date} · {s.benchCount} benches · {s.slotMinutes} min · {s.status}</span>
            </li>
          ))}
        </ul>
      ) : (
        <p className="mb-3 text-ink-soft">{role === "instructor" ? "No practical yet: design one." : "No practical is planned yet."}</p>
      )}
      {staff ? (
        <nav aria-label="Planning" className="flex flex-wrap gap-2">
          {role === "instructor" ? <Link className="rounded bg-accent px-3 py-1 font-bold text-accent-ink" to={`/courses/${courseId}/sessions/new`}>Design a practical</Link> : null}
          {role === "instructor" ? <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/courses/${courseId}/roster`}>Roster import</Link> : null}
          <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/courses/${courseId}/gradebook`}>Gradebook</Link>
          <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/courses/${courseId}/groups`}>Groups</Link>
          <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/courses/${courseId}/reactions`}>Reaction systems</Link>
        </nav>
      ) : null}
    </section>
  );
}
