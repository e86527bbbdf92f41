// The review queue of one practical for instructors and demonstrators: each group's latest
// version with its mark and flags, sorted into to check / flagged / checked; the instructor
// releases the practical's marks from here (each group is e-mailed).
import { Form, Link, data, useNavigation } from "react-router";
import type { Route } from "./+types/review";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { readForm } from "~/.server/body.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { requireSessionStaff } from "~/.server/submissions/context.server";
import { checkUnflagged, releaseInfo, releaseMarks, reviewQueue, type QueueTab } from "~/.server/submissions/review.server";
import { PageTitle } from "~/components/page";
import { FormMessage } from "~/components/form";
import { StatusBadge } from "~/components/run-plots";
import { sig } from "~/lib/format";
import { trailFor } from "~/lib/place";
import { practicalPlace } from "~/.server/place.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Review${data ? `: ${data.session.title}` : ""} · Ratebook` }];

const TABS: Array<{ id: QueueTab | "all"; label: string }> = [
  { id: "all", label: "All groups" },
  { id: "flagged", label: "Flagged" },
  { id: "to-check", label: "To check" },
  { id: "checked", label: "Checked" },
];

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const session = await requireSessionStaff(user, pathId(params.sessionId), false);
    const tab = (new URL(request.url).searchParams.get("tab") ?? "all") as QueueTab | "all";
    const { rows, counts } = await reviewQueue(session);
    const release = await releaseInfo(session.id);
    return {
      session: { id: session.id, title: session.title, date: session.date },
      place: await practicalPlace(session.id),
      tab: TABS.some((t) => t.id === tab) ? tab : "all",
      rows,
      counts,
      releasedAt: release.releasedAt ? release.releasedAt.toISOString() : null,
      showsReference: release.showsReference,
      canRelease: user.role === "admin" || (await requireSessionStaff(user, session.id, false, ["instructor"]).then(() => true, () => false)),
    };
  });
}

export async function action({ request, params }: Route.ActionArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const form = await readForm(request);
    if (form.get("intent") === "check-unflagged") {
      // demonstrators check versions too; the ids are the ones the page counted
      const staffSession = await requireSessionStaff(user, pathId(params.sessionId), false);
      const ids = String(form.get("ids") ?? "").split(",").map((x) => Number(x)).filter((x) => Number.isInteger(x) && x > 0);
      const { changed, skipped } = await checkUnflagged(user, staffSession, ids);
      return { checked: changed, skipped };
    }
    const session = await requireSessionStaff(user, pathId(params.sessionId), false, ["instructor"]);
    if (form.get("intent") !== "release") throw data({ message: "Unknown action: send intent=release or intent=check-unflagged." }, { status: 400 });
    const { mails } = await releaseMarks(user, session, form.get("showReference") === "on");
    return { released: true, mails };
  });
}

export default function Review({ loaderData, actionData }: Route.ComponentProps) {
  const { session, rows, counts, tab, releasedAt, canRelease } = loaderData;
  const navigation = useNavigation();
  const shown = rows.filter((r) => tab === "all" || r.latest?.tab === tab);
  const unflagged = rows.filter((r) => r.latest && r.latest.tab === "to-check" && r.latest.status === "marked");
  const unchecked = rows.filter((r) => r.latest && r.latest.tab !== "checked");
  return (
    <>
      <PageTitle trail={trailFor("Review", loaderData.place.course, loaderData.place.practical)} sub={`${session.date} · ${rows.length} ${rows.length === 1 ? "group" : "groups"} at a bench · ${counts.none} without a submission`}>Review: {session.title}</PageTitle>
      <nav aria-label="This practical" className="mb-4 flex flex-wrap gap-3">
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}`}>Practical</Link>
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}/class-results`}>Class results</Link>
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}/gradebook`}>Gradebook</Link>
      </nav>
      {actionData && "released" in actionData ? <FormMessage tone="info">Marks released; {actionData.mails} e-mail(s) queued to the groups.</FormMessage> : null}
      {actionData && "checked" in actionData ? <FormMessage tone="info">{actionData.checked} {actionData.checked === 1 ? "version" : "versions"} marked as checked{actionData.skipped ? `; ${actionData.skipped} left as they were (changed or flagged meanwhile)` : ""}.</FormMessage> : null}
      {releasedAt && unchecked.length ? (
        <div role="status" className="mb-4 rounded border-l-4 border-warn bg-warn-soft px-4 py-3" data-testid="unchecked-after-release">
          <strong>Released, but {unchecked.length} {unchecked.length === 1 ? "version is" : "versions are"} not checked yet:</strong>{" "}
          {unchecked.map((r, i) => <span key={r.groupId}>{i ? ", " : ""}<Link className="text-accent underline" to={`/sessions/${session.id}/review/${r.latest!.id}`}>{r.group}</Link>{r.latest!.tab === "flagged" ? " (flagged)" : ""}</span>)}
        </div>
      ) : null}
      <div className="mb-4 flex flex-wrap items-center gap-3">
        {rows.some((r) => r.latest?.tab === "flagged") ? <Link className="rounded bg-accent px-3 py-1 font-bold text-accent-ink" to={`/sessions/${session.id}/review/${rows.find((r) => r.latest?.tab === "flagged")!.latest!.id}`}>Start with the first flagged</Link> : null}
        <Form method="post">
          <input type="hidden" name="intent" value="check-unflagged" />
          <input type="hidden" name="ids" value={unflagged.map((r) => r.latest!.id).join(",")} />
          <button type="submit" disabled={navigation.state !== "idle" || unflagged.length === 0} className="rounded border border-ink px-3 py-1 font-bold disabled:opacity-50">
            Mark all unflagged as checked ({unflagged.length} {unflagged.length === 1 ? "version" : "versions"})
          </button>
        </Form>
      </div>
      <nav aria-label="Review queue" className="mb-4 flex flex-wrap gap-2">
        {TABS.map((t) => (
          <Link key={t.id} to={`?tab=${t.id}`} aria-current={tab === t.id ? "page" : undefined}
            className={`rounded border px-3 py-1 ${tab === t.id ? "border-ink bg-accent-soft font-bold" : "border-rule bg-white"}`}>
            {t.label} <span className="num">({t.id === "all" ? rows.length : counts[t.id]})</span>
          </Link>
        ))}
      </nav>
      {shown.length === 0 ? (
        <p className="rounded border border-dashed border-rule p-6 text-ink-soft">Nothing here. {tab !== "all" ? <Link className="text-accent underline" to="?tab=all">Show all groups</Link> : "Groups upload from their practical's page."}</p>
      ) : (
        <div className="overflow-x-auto rounded border border-rule bg-white">
          <table className="w-full border-collapse whitespace-nowrap text-left">
            <thead>
              <tr className="border-b-2 border-ink">
                <th className="px-3 py-2">Group</th><th className="px-3 py-2">Bench</th><th className="num px-3 py-2">T / °C</th>
                <th className="px-3 py-2">Latest</th><th className="num px-3 py-2">k vs reference</th><th className="num px-3 py-2">Mark</th><th className="px-3 py-2">Why flagged</th><th className="px-3 py-2">State</th>
              </tr>
            </thead>
            <tbody>
              {shown.map((r) => (
                <tr key={r.groupId} className="border-b border-rule align-top">
                  <td className="px-3 py-2 font-bold">{r.latest ? <Link className="text-accent underline" to={`/sessions/${session.id}/review/${r.latest.id}`}>{r.group}</Link> : r.group}</td>
                  <td className="px-3 py-2">{r.bench}</td>
                  <td className="num px-3 py-2">{sig(r.temperatureC, 3)}</td>
                  <td className="px-3 py-2">{r.latest ? <>v{r.latest.version} of {r.versions} <StatusBadge status={r.latest.status} late={r.latest.late} /></> : <span className="text-ink-soft">no upload</span>}</td>
                  <td className="num px-3 py-2">{r.latest?.deviationPct !== null && r.latest?.deviationPct !== undefined ? `${r.latest.deviationPct > 0 ? "+" : "−"}${sig(Math.abs(r.latest.deviationPct), 3)} %` : "—"}</td>
                  <td className="num px-3 py-2">{r.latest?.mark !== null && r.latest?.mark !== undefined ? <>{sig(r.latest.mark, 3)} %{r.latest.overridden ? " (set)" : ""}</> : "—"}</td>
                  <td className="px-3 py-2 text-sm" data-testid="why-flagged">{r.latest?.words.length ? r.latest.words.map((w) => <span key={w} title={r.latest?.markingError ?? undefined} className="mr-1 inline-block rounded border border-warn px-1 text-warn">⚠ {w}</span>) : r.latest ? "—" : ""}</td>
                  <td className="px-3 py-2 text-sm">{r.latest ? { flagged: "⚠ flagged", "to-check": "◌ to check", checked: "✓ checked" }[r.latest.tab] : ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <section aria-labelledby="release-h" className="mt-8 rounded border border-rule bg-white p-4">
        <h2 id="release-h" className="text-xl font-bold">Release marks</h2>
        {releasedAt ? <p className="mt-1">Released {new Date(releasedAt).toLocaleString("en-GB", { timeZone: "UTC" })} UTC{loaderData.showsReference ? ", with the reference value shown to students" : ""}. Releasing again e-mails the groups again and keeps later changes visible.</p> : <p className="mt-1">Students see their marks and feedback only after release. Each group member gets an e-mail.</p>}
        {canRelease ? (
          <Form method="post" className="mt-3">
            <input type="hidden" name="intent" value="release" />
            <label className="mb-3 flex items-center gap-2"><input type="checkbox" name="showReference" /> Show students the expected k at their bench's temperature</label>
            <button type="submit" className="rounded bg-accent px-4 py-2 font-bold text-accent-ink" disabled={navigation.state !== "idle"}>{releasedAt ? "Release again" : "Release marks"}</button>
          </Form>
        ) : <p className="mt-2 text-sm text-ink-soft">Only an instructor of the course can release marks.</p>}
      </section>
    </>
  );
}
