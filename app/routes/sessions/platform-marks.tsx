// What the learning platforms hold of a practical's released marks: each student's score as sent,
// what is waiting (a platform that is down is retried) and what failed, with the platform's answer.
import { Form, Link, data } from "react-router";
import type { Route } from "./+types/platform-marks";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { readForm } from "~/.server/body.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { requireSessionStaff } from "~/.server/submissions/context.server";
import { platformScores, resendFailedScores } from "~/.server/lti/grades.server";
import { PageTitle } from "~/components/page";
import { FormMessage } from "~/components/form";
import { sig } from "~/lib/format";
import { trailFor } from "~/lib/place";
import { practicalPlace } from "~/.server/place.server";

export const meta: Route.MetaFunction = () => [{ title: "Marks sent to the learning platform · Ratebook" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const session = await requireSessionStaff(user, pathId(params.sessionId), false, ["instructor"]);
    const rows = await platformScores(session.id);
    return {
      session: { id: session.id, title: session.title, released: session.marksReleasedAt !== null },
      place: await practicalPlace(session.id),
      rows: rows.map((r) => ({ ...r, sentAt: r.sentAt ? new Date(r.sentAt).toISOString() : null })),
    };
  });
}

export async function action({ request, params }: Route.ActionArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const session = await requireSessionStaff(user, pathId(params.sessionId), false, ["instructor"]);
    const form = await readForm(request);
    if (form.get("intent") !== "resend") throw data({ message: "Unknown action: send intent=resend." }, { status: 400 });
    return { resent: await resendFailedScores(user.id, session) };
  });
}

const STATE_TEXT = { sent: "sent", waiting: "waiting (retried)", failed: "failed" } as const;

export default function PlatformMarks({ loaderData, actionData }: Route.ComponentProps) {
  const { session, rows, place } = loaderData;
  const failed = rows.filter((r) => r.state === "failed").length;
  const waiting = rows.filter((r) => r.state === "waiting").length;
  return (
    <>
      <PageTitle trail={trailFor("Learning platform", place.course, place.practical)} sub={session.released ? `${rows.length - waiting - failed} sent · ${waiting} waiting · ${failed} failed` : "marks not released: nothing is sent before release"}>
        Marks sent to the learning platform: {session.title}
      </PageTitle>
      <nav aria-label="This practical" className="mb-4 flex flex-wrap gap-2">
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}/gradebook`}>Gradebook</Link>
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}/review`}>Review queue</Link>
      </nav>
      {actionData && "resent" in actionData ? <FormMessage tone="info">{actionData.resent} failed score(s) will be sent again.</FormMessage> : null}
      {rows.length === 0 ? (
        <p>No scores for a learning platform: only students who opened Ratebook from a linked platform course get one, once marks are released.</p>
      ) : (
        <table className="w-full text-left text-sm">
          <thead><tr><th scope="col">Student</th><th scope="col">Platform</th><th scope="col">Mark</th><th scope="col">Platform holds</th><th scope="col">State</th><th scope="col">Attempts</th><th scope="col">Sent (UTC)</th><th scope="col">Last problem</th></tr></thead>
          <tbody>
            {rows.map((r) => (
              <tr key={`${r.email}-${r.platform}`} className="border-t border-ink-soft/30">
                <td>{r.student}</td><td>{r.platform}</td><td>{sig(r.mark, 3)}</td><td>{r.sentMark === null ? "nothing yet" : sig(r.sentMark, 3)}</td>
                <td>{STATE_TEXT[r.state]}</td><td>{r.attempts}</td><td>{r.sentAt ? r.sentAt.slice(0, 16).replace("T", " ") : ""}</td><td>{r.lastError ?? ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {failed > 0 ? (
        <Form method="post" className="mt-4">
          <input type="hidden" name="intent" value="resend" />
          <button type="submit" className="rounded bg-accent px-3 py-1 text-white">Send the {failed} failed score(s) again</button>
        </Form>
      ) : null}
    </>
  );
}
