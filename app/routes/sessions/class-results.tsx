// Class results of one practical, for its staff: the pooled Arrhenius plot of the benches' marking
// k with Ea and A beside the reference, each bench's k against the reference k at its temperature,
// and (instructors) leaving a bench out of the fit with a reason, or putting it back.
import { Form, Link, data, useNavigation } from "react-router";
import { parseWithZod } from "@conform-to/zod/v4";
import type { Route } from "./+types/class-results";
import { requireUser } from "~/.server/guards.server";
import { formId, pathId } from "~/.server/ids.server";
import { readForm } from "~/.server/body.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { classResultsAccess, classResultsView, excludeBench, excludeSchema, includeBench, requireClassResultsChange } from "~/.server/class-results/service.server";
import { PageTitle, TableBox } from "~/components/page";
import { Button, FieldError, FormMessage } from "~/components/form";
import { XYPlot } from "~/components/xy-plot";
import { MINUS, sig, withInterval } from "~/lib/format";
import { fieldError, typed, type FormResult } from "~/lib/form-result";
import { REASON_MAX } from "~/lib/gradebook/class-results";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Class results${data ? `: ${data.session.title}` : ""} · Ratebook` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const access = await classResultsAccess(user, pathId(params.sessionId));
    return classResultsView(access);
  });
}

type ActionData = { tone: "info" | "error"; message: string; result?: FormResult; benchError?: string };

export async function action({ request, params }: Route.ActionArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const access = await requireClassResultsChange(user, pathId(params.sessionId));
    const form = await readForm(request);
    const intent = String(form.get("intent") ?? "");
    const benchId = formId(form, "benchId");
    if (intent === "exclude") {
      const submission = parseWithZod(form, { schema: excludeSchema });
      const benchError = benchId === null ? "Choose the bench to leave out." : undefined;
      if (submission.status !== "success" || benchId === null) {
        return data<ActionData>({ tone: "error", message: "The bench was not left out: see the form.", result: submission.reply(), benchError }, { status: 400 });
      }
      const r = await excludeBench(user, access, benchId, submission.value.reason);
      if (!r.ok) return data<ActionData>({ tone: "error", message: r.message, result: submission.reply(), benchError: r.field === "benchId" ? r.message : undefined }, { status: r.status });
      return data<ActionData>({ tone: "info", message: `Bench ${r.bench} is left out of the class fit; the fit below is without it.` });
    }
    if (intent === "include") {
      if (benchId === null) return data<ActionData>({ tone: "error", message: "Which bench? The form lost its bench id." }, { status: 400 });
      const r = await includeBench(user, access, benchId);
      if (!r.ok) return data<ActionData>({ tone: "error", message: r.message }, { status: r.status });
      return data<ActionData>({ tone: "info", message: `Bench ${r.bench} is back in the class fit.` });
    }
    return data<ActionData>({ tone: "error", message: `Unknown action "${intent}": send intent=exclude or intent=include.` }, { status: 400 });
  });
}

const signedPct = (x: number | null) => (x === null || !Number.isFinite(x) ? "—" : `${x > 0 ? "+" : x < 0 ? MINUS : ""}${sig(Math.abs(x), 3)} %`);

export default function ClassResultsPage({ loaderData, actionData }: Route.ComponentProps) {
  const { session, reaction, benches, fit, noFit, reference, plot, counts, canChange } = loaderData;
  const busy = useNavigation().state !== "idle";
  const unit = reaction.kUnit;
  const excluded = benches.filter((b) => b.exclusion);
  const choosable = benches.filter((b) => !b.exclusion);
  const result = actionData?.result;
  return (
    <>
      <PageTitle trail={trailFor("Class results", { id: session.courseId, code: session.courseCode }, session)} sub={<>{session.date} · {reaction.name} · {counts.inFit} of {benches.length} benches in the fit{counts.excluded ? `, ${counts.excluded} left out` : ""}</>}>
        Class results: {session.title}
      </PageTitle>
      <nav aria-label="This practical" className="mb-6 flex flex-wrap gap-3">
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}`}>Practical</Link>
        <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${session.id}/review`}>Review queue</Link>
      </nav>
      {actionData ? <FormMessage tone={actionData.tone}>{actionData.message}</FormMessage> : null}

      <section aria-labelledby="fit-h">
        <h2 id="fit-h" className="mb-2 text-xl font-bold">Pooled Arrhenius fit</h2>
        {noFit ? <p className="mb-3 rounded border border-dashed border-rule bg-white p-4">{noFit}</p> : null}
        <TableBox label="Fitted and reference Arrhenius parameters">
          <table className="w-full border-collapse text-left">
            <thead>
              <tr className="border-b-2 border-ink">
                <th className="px-3 py-2"><span className="sr-only">Quantity</span></th>
                <th className="px-3 py-2">Class fit{fit ? ` (${fit.n} benches)` : ""}</th>
                <th className="px-3 py-2">Reference</th>
              </tr>
            </thead>
            <tbody>
              <tr className="border-b border-rule">
                <th scope="row" className="px-3 py-2">Activation energy Ea</th>
                <td className="px-3 py-2 tabular-nums" data-testid="fit-ea">{fit ? `${withInterval(fit.EaKJ, fit.EaKJCI95, 3)} kJ/mol` : "—"}</td>
                <td className="px-3 py-2 tabular-nums">{sig(reference.EaKJ, 4)} kJ/mol</td>
              </tr>
              <tr className="border-b border-rule">
                <th scope="row" className="px-3 py-2">Pre-exponential factor A</th>
                <td className="px-3 py-2 tabular-nums">{fit ? `${withInterval(fit.A, fit.ACI95, 3)} ${unit}` : "—"}</td>
                <td className="px-3 py-2 tabular-nums">{sig(reference.A, 4)} {unit}</td>
              </tr>
            </tbody>
          </table>
        </TableBox>
        {fit ? (
          <p className="mt-2">
            R² = {sig(fit.r2, 4)}; {fit.dof} {fit.dof === 1 ? "degree" : "degrees"} of freedom; {fit.weighting === "k-uncertainty" ? "each bench weighted by its k uncertainty" : "benches weighted equally (not every bench has a k uncertainty)"}; reduced χ² = {sig(fit.reducedChiSquare, 3)}{fit.reducedChiSquare > 3 ? " (the benches scatter more than their own uncertainties say)" : ""}.
          </p>
        ) : null}
        <p className="mt-2 text-sm text-ink-soft">Intervals are 95 % (Student t). Reference A = k ref · exp(Ea / (R · T ref)), from the reaction system's k ref = {sig(reference.kRef, 4)} {unit} at {sig(reference.TrefC, 4)} °C and its Ea.</p>
        {plot.inFit.length || plot.excluded.length ? (
          <XYPlot
            title="Class Arrhenius plot: ln k against 1/T"
            xLabel="1/T (10⁻³ K⁻¹)"
            yLabel={`ln(k / (${unit}))`}
            points={plot.inFit}
            crosses={plot.excluded}
            curve={plot.fitted}
            dashed={plot.reference}
            legend={{ points: "benches in the fit", crosses: "benches left out of the fit", curve: "the class fit", dashed: "the reference" }}
          />
        ) : <p className="mt-4 text-ink-soft">No bench has a marked k yet, so there is nothing to plot.</p>}
      </section>

      <section aria-labelledby="spread-h" className="mt-8">
        <h2 id="spread-h" className="mb-2 text-xl font-bold">Marking k against the reference, per bench</h2>
        <TableBox label="Marking k and reference k per bench">
          <table className="w-full border-collapse text-left [&_th]:whitespace-nowrap [&_td.num]:whitespace-nowrap">
            <thead>
              <tr className="border-b-2 border-ink">
                <th className="px-3 py-2">Bench</th>
                <th className="px-3 py-2">Group</th>
                <th className="num px-3 py-2">T (°C)</th>
                <th className="num px-3 py-2">Marking k ({unit})</th>
                <th className="num px-3 py-2">k ref at T ({unit})</th>
                <th className="num px-3 py-2">Deviation</th>
                <th className="min-w-56 px-3 py-2">Class fit</th>
              </tr>
            </thead>
            <tbody>
              {benches.map((b) => (
                <tr key={b.benchId} className="border-b border-rule align-top">
                  <td className="px-3 py-2 font-bold">{b.bench}</td>
                  <td className="px-3 py-2 whitespace-nowrap">{b.submissionId ? <Link className="text-accent underline" to={`/sessions/${session.id}/review/${b.submissionId}`}>{b.group}</Link> : b.group}</td>
                  <td className="num px-3 py-2">{sig(b.temperatureC, 3)}</td>
                  <td className="num px-3 py-2">{b.lnK !== null ? withInterval(b.k!, b.kCI95, 3) : "—"}</td>
                  <td className="num px-3 py-2">{sig(b.kRefAtT, 4)}</td>
                  <td className="num px-3 py-2">{signedPct(b.deviationPct)}</td>
                  <td className="px-3 py-2 text-sm">{b.state === "in-fit" ? "✓ in the fit" : b.exclusion ? <><span className="font-bold text-bad">✕ left out</span>: {b.exclusion.reason}</> : `— ${b.note}`}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </TableBox>
        <p className="mt-2 text-sm text-ink-soft">Each group's latest version counts, once it is marked. Deviation = (marking k − k ref) / k ref.</p>
      </section>

      <section aria-labelledby="left-out-h" className="mt-8 rounded border border-rule bg-white p-4">
        <h2 id="left-out-h" className="mb-2 text-xl font-bold">Benches left out of the fit ({excluded.length})</h2>
        {excluded.length === 0 ? <p>None: every bench with a marked k is in the fit.</p> : (
          <ul className="divide-y divide-rule">
            {excluded.map((b) => (
              <li key={b.benchId} className="flex flex-wrap items-start justify-between gap-2 py-2">
                <div className="min-w-0">
                  <p><span className="font-bold">Bench {b.bench}</span> ({b.group}, {sig(b.temperatureC, 3)} °C): <span className="break-words">{b.exclusion!.reason}</span></p>
                  <p className="text-sm text-ink-soft">Left out by {b.exclusion!.by ?? "a former member"}, {b.exclusion!.at.slice(0, 16).replace("T", " ")} UTC</p>
                </div>
                {canChange ? (
                  <Form method="post">
                    <input type="hidden" name="intent" value="include" />
                    <input type="hidden" name="benchId" value={b.benchId} />
                    <button type="submit" disabled={busy} className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft">Put back<span className="sr-only"> bench {b.bench} into the fit</span></button>
                  </Form>
                ) : null}
              </li>
            ))}
          </ul>
        )}
        {canChange && choosable.length ? (
          <Form key={`exclude-${excluded.length}`} method="post" noValidate className="mt-4 border-t border-rule pt-4">
            <h3 className="mb-2 font-bold">Leave a bench out</h3>
            <input type="hidden" name="intent" value="exclude" />
            <div className="mb-3">
              <label htmlFor="f-benchId" className="block font-bold">Bench</label>
              <select id="f-benchId" name="benchId" defaultValue={typed(result, "benchId") ?? ""} aria-invalid={actionData?.benchError ? true : undefined} aria-describedby={actionData?.benchError ? "f-benchId-error" : undefined}
                className={`mt-1 w-full max-w-sm rounded border bg-white px-3 py-2 ${actionData?.benchError ? "border-bad" : "border-ink-soft"}`}>
                <option value="">— choose a bench —</option>
                {choosable.map((b) => <option key={b.benchId} value={b.benchId}>Bench {b.bench} ({b.group}, {sig(b.temperatureC, 3)} °C)</option>)}
              </select>
              <FieldError id="f-benchId-error" message={actionData?.benchError} />
            </div>
            <div className="mb-3">
              <label htmlFor="f-reason" className="block font-bold">Reason (shown here and kept in the audit log)</label>
              <textarea id="f-reason" name="reason" rows={2} maxLength={REASON_MAX} defaultValue={typed(result, "reason") ?? ""} aria-invalid={fieldError(result, "reason") ? true : undefined} aria-describedby={fieldError(result, "reason") ? "f-reason-error" : undefined}
                className={`mt-1 w-full rounded border bg-white px-3 py-2 ${fieldError(result, "reason") ? "border-bad" : "border-ink-soft"}`} />
              <FieldError id="f-reason-error" message={fieldError(result, "reason")} />
            </div>
            <Button busy={busy}>Leave out of the fit</Button>
          </Form>
        ) : null}
        {!canChange ? <p className="mt-2 text-sm text-ink-soft">Only an instructor of the course leaves benches out or puts them back.</p> : null}
      </section>
    </>
  );
}
