import type { Route } from "./+types/bench-sheet";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { sessionAccess } from "~/.server/planning/sessions.server";
import { oneSheet, paperOf } from "~/.server/planning/sheets.server";
import { Breadcrumb } from "~/components/page";
import { trailFor } from "~/lib/place";
import { BenchSheet, PrintBar } from "~/components/planning/print";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Bench ${data?.sheets[0]?.label ?? ""} · ${data?.session.title ?? ""} · Ratebook` }];

/** One bench sheet: staff any bench, a student only their own group's. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const access = await sessionAccess(user, pathId(params.sessionId));
  return { ...(await oneSheet(access, pathId(params.benchId))), paper: paperOf(new URL(request.url)) };
}

export default function OneBenchSheet({ loaderData }: Route.ComponentProps) {
  const { sheets, paper, ...d } = loaderData;
  return (
    <div className={`paper-${paper}`}>
      <Breadcrumb trail={trailFor(`Bench ${sheets[0].label} sheet`, d.course, d.session)} />
      <PrintBar paper={paper} base={`/sessions/${d.session.id}/benches/${sheets[0].benchId}/sheet`} />
      <h1 className="sr-only">Bench sheet</h1>
      {sheets.map((s) => <BenchSheet key={s.benchId} d={d} sheet={s} />)}
    </div>
  );
}
