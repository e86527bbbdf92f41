import { Form } from "react-router";
import type { Route } from "./+types/prep";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { sessionAccess } from "~/.server/planning/sessions.server";
import { paperOf, prepList } from "~/.server/planning/sheets.server";
import { Breadcrumb } from "~/components/page";
import { trailFor } from "~/lib/place";
import { HazardCautions, PrintBar } from "~/components/planning/print";
import { fixed, mL } from "~/lib/planning/format";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Prep list · ${data?.session.title ?? ""} · Ratebook` }];

/** The technician's prep list (staff): per-bench volumes, totals with a chosen margin. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const access = await sessionAccess(user, pathId(params.sessionId));
  const url = new URL(request.url);
  const raw = Number(url.searchParams.get("margin") ?? 10);
  const margin = Number.isFinite(raw) && raw >= 0 && raw <= 100 ? raw : 10;
  return { ...(await prepList(access, margin)), paper: paperOf(url) };
}

export default function Prep({ loaderData }: Route.ComponentProps) {
  const { session, reaction, rows, totals, marginPct, paper, hazards, course } = loaderData;
  const V = session.reactorVolumeMl;
  const litres = (ml: number) => (ml >= 1000 ? `${fixed(ml / 1000, 2)} L` : mL(ml));
  return (
    <div className={`paper-${paper}`}>
      <Breadcrumb trail={trailFor("Prep list", course, session)} />
      <PrintBar
        paper={paper}
        base={`/sessions/${session.id}/prep?margin=${marginPct}`}
        extra={
          <Form method="get" className="flex items-center gap-2">
            <input type="hidden" name="paper" value={paper} />
            <label htmlFor="margin" className="font-bold">Margin (%)</label>
            <input id="margin" name="margin" defaultValue={marginPct} inputMode="decimal" className="w-16 rounded border border-ink-soft px-2 py-1" />
            <button type="submit" className="rounded border border-ink-soft px-3 py-1">Apply</button>
          </Form>
        }
      />
      <article className="sheet rounded border border-rule bg-white p-6 text-black print-plain print:p-0" aria-label="Prep list">
        <header className="border-b-2 border-black pb-2">
          <p className="text-sm">{course.code} · {session.date}</p>
          <h1 className="text-2xl font-bold">Prep list: {session.title}</h1>
          <p className="text-sm">{reaction.name}. Each reactor holds {fixed(V, 0)} mL; stock A ({reaction.speciesA}) {fixed(session.stockAMolL, 3)} mol/L, stock B ({reaction.speciesB}) {fixed(session.stockBMolL, 3)} mol/L.</p>
        </header>
        <section aria-label="Totals" className="mt-3">
          <h2 className="font-bold">Totals for {rows.length} benches, with a {marginPct} % margin</h2>
          <table className="mt-1 w-full border-collapse text-sm">
            <thead><tr className="border-b border-black"><th className="text-left">Reagent</th><th className="text-right">Sum over benches</th><th className="text-right">To prepare (+{marginPct} %)</th></tr></thead>
            <tbody>
              <tr><td>Stock A, {fixed(session.stockAMolL, 3)} mol/L</td><td className="num">{mL(totals.stockAMl)}</td><td className="num font-bold">{litres(totals.withMargin.stockAMl)}</td></tr>
              <tr><td>Stock B, {fixed(session.stockBMolL, 3)} mol/L</td><td className="num">{mL(totals.stockBMl)}</td><td className="num font-bold">{litres(totals.withMargin.stockBMl)}</td></tr>
              <tr><td>Water (deionised)</td><td className="num">{mL(totals.waterMl)}</td><td className="num font-bold">{litres(totals.withMargin.waterMl)}</td></tr>
            </tbody>
          </table>
        </section>
        <section aria-label="Per bench" className="mt-4">
          <h2 className="font-bold">Per bench: V1 = C2 · V2 / C1 (C1 stock, C2 in the reactor, V2 = {fixed(V, 0)} mL)</h2>
          <div className="overflow-x-auto" role="region" aria-label="Volumes per bench" tabIndex={0}>
            <table className="mt-1 w-full border-collapse text-sm">
              <thead>
                <tr className="border-b border-black">
                  <th className="py-1 pr-3 text-left">Bench</th><th className="py-1 pr-4 text-right">T (°C)</th><th className="py-1 pr-4 text-left">Stock A</th><th className="py-1 pr-4 text-left">Stock B</th><th className="py-1 text-right">Water</th>
                </tr>
              </thead>
              <tbody>
                {rows.map((r) => (
                  <tr key={r.label} className="border-b border-black/30">
                    <td className="py-1 pr-3 font-bold">{r.label}</td>
                    <td className="num py-1 pr-4">{fixed(r.temperatureC, 1)}</td>
                    <td className="py-1 pr-4 tabular-nums">{fixed(r.CA0, 4)} × {fixed(V, 0)} / {fixed(session.stockAMolL, 3)} = <strong>{mL(r.volumes.stockAMl)}</strong></td>
                    <td className="py-1 pr-4 tabular-nums">{fixed(r.CB0, 4)} × {fixed(V, 0)} / {fixed(session.stockBMolL, 3)} = <strong>{mL(r.volumes.stockBMl)}</strong></td>
                    <td className="num">{mL(r.volumes.waterMl)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
        <HazardCautions hazards={hazards} />
      </article>
    </div>
  );
}
