// A practical's gradebook for its instructors and demonstrators: a row per group at a bench.
import { Link, type ShouldRevalidateFunctionArgs } from "react-router";
import type { Route } from "./+types/gradebook";
import { requireUser } from "~/.server/guards.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { sessionGradebookPage } from "~/.server/gradebook/pages.server";
import { PageTitle } from "~/components/page";
import { SessionGradebookTable } from "~/components/gradebook/session-table";
import { gradebookSummary } from "~/components/gradebook/summary";
import { sig } from "~/lib/format";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Gradebook${data ? `: ${data.session.title}` : ""} · Ratebook` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(false, async () => sessionGradebookPage(await requireUser(request), params.sessionId));
}

/** Saving the table view changes nothing the page loaded. */
export function shouldRevalidate({ formAction, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  return formAction?.startsWith("/api/table-views/") ? false : defaultShouldRevalidate;
}

export default function SessionGradebook({ loaderData }: Route.ComponentProps) {
  const { session, reaction, rows, kUnit, view } = loaderData;
  return (
    <>
      <PageTitle trail={trailFor("Gradebook", { id: session.courseId, code: session.courseCode }, session)}
        sub={<>{session.date} · {reaction.name} · {session.marksReleasedAt ? "marks released" : "marks not released"}</>}
      >
        Gradebook: {session.title}
      </PageTitle>
      <nav aria-label="This practical" className="mb-4 flex flex-wrap gap-2">
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}`}>Practical page</Link>
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}/review`}>Review queue</Link>
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/courses/${session.courseId}/gradebook`}>Course gradebook</Link>
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}/platform-marks`}>Learning platform</Link>
        {/* plain links: downloads are resource routes, not pages for the router to load */}
        <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/sessions/${session.id}/export.xlsx`} download>Download workbook (.xlsx)</a>
        <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/sessions/${session.id}/export.csv`} download>Marks (.csv)</a>
      </nav>
      <p className="mb-1">{gradebookSummary(rows)}</p>
      <p className="mb-4 text-sm text-ink-soft">
        Reference (staff only): k = {sig(reaction.kRef, 3)} {kUnit} at {sig(reaction.TrefC, 3)} °C, Ea = {sig(reaction.EaKJ, 3)} kJ/mol. Each row is the group's latest version; select a group to review it.
      </p>
      <SessionGradebookTable sessionId={session.id} kUnit={kUnit} rows={rows} initialView={view} />
    </>
  );
}
