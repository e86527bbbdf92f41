import type { Route } from "./+types/sheets";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { sessionAccess } from "~/.server/planning/sessions.server";
import { allSheets, paperOf } from "~/.server/planning/sheets.server";
import { Breadcrumb } from "~/components/page";
import { trailFor } from "~/lib/place";
import { BenchSheet, PrintBar } from "~/components/planning/print";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Bench sheets · ${data?.session.title ?? ""} · Ratebook` }];

/** Every bench sheet of a practical, one a page (staff). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const access = await sessionAccess(user, pathId(params.sessionId));
  return { ...(await allSheets(access)), paper: paperOf(new URL(request.url)) };
}

export default function Sheets({ loaderData }: Route.ComponentProps) {
  const { sheets, paper, ...d } = loaderData;
  return (
    <div className={`paper-${paper}`}>
      <Breadcrumb trail={trailFor("Bench sheets", d.course, d.session)} />
      <h1 className="no-print mb-3 text-3xl font-bold">Bench sheets: {d.session.title}</h1>
      <PrintBar paper={paper} base={`/sessions/${d.session.id}/sheets`} />
      {sheets.map((s) => <BenchSheet key={s.benchId} d={d} sheet={s} />)}
    </div>
  );
}
