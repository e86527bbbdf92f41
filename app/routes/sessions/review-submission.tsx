// One group's submission under review: plots, flags, engine details, every version with its
// original file, and the reviewer's tools: leave out a reading (with a reason; the mark is
// recomputed), override the mark (reason required, audited), comment, mark as checked.
import { Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/review-submission";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { readForm } from "~/.server/body.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { requireSessionStaff } from "~/.server/submissions/context.server";
import { loadSubmission } from "~/.server/submissions/access.server";
import { addComment, chooseCountingVersion, correctSubmission, excludeReading, includeReading, markAgain, overrideMark, queueStops, queueTabOf, releaseInfo, reviewQueue, setReviewState } from "~/.server/submissions/review.server";
import { neighbours } from "~/lib/marking/queue";
import { withFileRows, fileRowsText } from "~/lib/marking/rows";
import { flagTitle } from "~/lib/marking/flag-titles";
import { MARKING_K_NAME, OWN_LINE_STAFF_NAME, markingKMethod, ownLineMethod } from "~/lib/marking/estimators";
import { marksOutOf, partText } from "~/lib/marking/rubric-view";
import { rubricFrom } from "~/lib/marking/rubric";
import { FEED_RATIO_HEADER, feedRatio } from "~/lib/planning/feed-ratio";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { submissionView } from "~/.server/submissions/view.server";
import { groupSubmissions } from "~/.server/submissions/list.server";
import { fittedRowNumbers, plotsOf, valueLabel } from "~/.server/submissions/page-data.server";
import { SubmissionComment, SubmissionFile } from "~/.server/db/submissions.server";
import { User } from "~/.server/db/models.server";
import { Bench } from "~/.server/db/lab-sessions.server";
import { PageTitle } from "~/components/page";
import { FormMessage } from "~/components/form";
import { ProblemList, RunPlotsView, StatusBadge } from "~/components/run-plots";
import { modelText, sig, unitText, withInterval } from "~/lib/format";
import { methodText } from "~/lib/marking/feedback";
import { CORRECTION_KINDS, CORRECTION_LABELS, correctionText, type CorrectionKind } from "~/lib/marking/corrections";
import { CONCENTRATION_UNITS, TIME_UNITS } from "~/lib/kinetics/units";
import { data } from "react-router";
import { trailFor } from "~/lib/place";
import { groupLabel, upperFirst } from "~/lib/natural-order";
import { practicalPlace } from "~/.server/place.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data ? `${data.group.name} v${data.view.version} · ` : ""}Review · Ratebook` }];

async function load(request: Request, params: { sessionId?: string; submissionId?: string }) {
  const user = await requireUser(request);
  const session = await requireSessionStaff(user, pathId(params.sessionId), false);
  const { submission, group } = await loadSubmission(user, pathId(params.submissionId), false);
  if (submission.sessionId !== session.id) throw data({ message: "This submission belongs to another practical." }, { status: 404 });
  return { user, session, submission, group };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(false, async () => {
    const { session, submission, group } = await load(request, params);
    const file = await SubmissionFile.findByPk(submission.id, { attributes: ["originalName", "size", "sha256", "contentType"] });
    const view = submissionView(submission, "staff", await releaseInfo(session.id), file?.originalName ?? null);
    const comments = await SubmissionComment.findAll({ where: { submissionId: submission.id }, include: [{ model: User, as: "author", attributes: ["displayName"] }], order: [["createdAt", "ASC"]] });
    const bench = submission.benchId ? await Bench.findByPk(submission.benchId) : null;
    const system = await ReactionSystem.findByPk(session.reactionSystemId, { attributes: ["id", "coeffA", "coeffB"] });
    const nu = system && system.coeffA > 0 ? system.coeffB / system.coeffA : 1;
    const queue = await reviewQueue(session);
    return {
      around: neighbours(queueStops(queue.rows), submission.id),
      outOf: marksOutOf(rubricFrom(session.rubric)),
      correctionCostPct: rubricFrom(session.rubric).correctionCostPct,
      flags: withFileRows(view.flags, fittedRowNumbers(submission)),
      feedRatio: bench ? feedRatio(bench.CA0, bench.CB0, nu) : null,
      session: { id: session.id, title: session.title },
      place: await practicalPlace(session.id),
      group: { id: group.id, name: group.name },
      bench: bench ? { label: bench.label, CA0: bench.CA0, CB0: bench.CB0, temperatureC: bench.temperatureC } : null,
      view,
      tab: queueTabOf(submission),
      file: file ? { name: file.originalName, size: file.size, sha256: file.sha256, type: file.contentType } : null,
      versions: await groupSubmissions(group.id, "staff", session.id),
      comments: comments.map((c) => ({ id: c.id, body: c.body, at: c.createdAt.toISOString(), author: c.author?.displayName ?? "former member" })),
      plots: plotsOf(submission, view.fit),
      valueLabel: valueLabel(submission),
      rows: submission.readings ? submission.readings.rowNumbers.slice(0, 5000) : [],
    };
  });
}

export async function action({ request, params }: Route.ActionArgs) {
  return whileDatabaseUp(false, async () => {
    const { user, submission } = await load(request, params);
    const form = await readForm(request);
    const intent = String(form.get("intent") ?? "");
    const text = (k: string) => String(form.get(k) ?? "");
    const rowOf = () => {
      const row = Number(text("row"));
      if (!Number.isInteger(row) || row < 1) throw data({ message: "Choose the row of the reading (its row number in the file)." }, { status: 400 });
      return row;
    };
    try {
      switch (intent) {
        case "exclude": await excludeReading(user, submission, rowOf(), text("reason")); return { ok: `Row ${text("row")} left out; the mark was recomputed.` };
        case "include": await includeReading(user, submission, rowOf()); return { ok: `Row ${text("row")} is back in; the mark was recomputed.` };
        case "override": {
          const raw = text("mark").trim().replace(",", ".");
          const mark = raw === "" ? NaN : Number(raw);
          if (!Number.isFinite(mark)) return { error: "Enter the mark in percent (0 to 100).", field: "mark" };
          await overrideMark(user, submission, mark, text("reason"));
          return { ok: `Mark set to ${mark} %.` };
        }
        case "clear-override": await overrideMark(user, submission, null, text("reason") || "override removed"); return { ok: "The automatic mark applies again." };
        case "correct": {
          const kind = text("kind");
          const to = { "concentration-unit": text("toConcentration"), "time-unit": text("toTime"), columns: text("toColumns"), "reading-left-out": text("toRow"), "swapped-columns": "" }[kind] ?? "";
          const c = await correctSubmission(user, submission, { kind, to, reason: text("reason") });
          return { ok: `Corrected (${correctionText(c)}) and marked again by the engine; the group's feedback says so.` };
        }
        case "comment": await addComment(user, submission, text("body")); return { ok: "Comment added." };
        case "count-this": await chooseCountingVersion(user, submission, true); return { ok: `Version ${submission.version} now counts in the gradebook.` };
        case "count-latest": await chooseCountingVersion(user, submission, false); return { ok: "The latest marked version counts again." };
        case "mark-again": await markAgain(user, submission); return { ok: submission.status === "marked" ? "Marked again." : "Marked again; it still fails (the reason is above)." };
        case "checked": await setReviewState(user, submission, "checked"); return { ok: "Marked as checked." };
        case "unchecked": await setReviewState(user, submission, "to-check"); return { ok: "Back in the queue." };
        default: throw data({ message: "Unknown action." }, { status: 400 });
      }
    } catch (thrown) {
      // a refused change (no reason, bad row) comes back beside its form
      if (thrown && typeof thrown === "object" && "type" in thrown && (thrown as { type: string }).type === "DataWithResponseInit") {
        const d = (thrown as unknown as { data: { message: string }; init: { status: number } });
        if (d.init.status === 400 || d.init.status === 409) return data({ error: d.data.message, field: intent }, { status: d.init.status });
      }
      throw thrown;
    }
  });
}

const input = "mt-1 w-full rounded border border-ink-soft bg-white px-3 py-2";

export default function ReviewSubmission({ loaderData, actionData }: Route.ComponentProps) {
  const { session, group, bench, view, file, versions, comments, plots, tab, around, outOf, flags } = loaderData;
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  const fit = view.fit;
  const checks = (view.checks ?? null) as unknown as { kMarking: number; kLine: number; kRefAtT: number; experiment: { deviationPct: number; band: string }; analysis: { deviationPct: number; band: string } } | null;
  const excluded = (view.excluded ?? []) as Array<{ row: number; reason: string; at: string }>;
  const correction = ((view.checks ?? null) as { correction?: { count: number; pctEach: number; marks: number } } | null)?.correction ?? null;
  const err = actionData && "error" in actionData ? actionData : null;
  return (
    <>
      <p className="mb-2 text-sm"><Link className="text-accent underline" to={`/sessions/${session.id}/review`}>← Review: {session.title}</Link> · <Link className="text-accent underline" to={`/sessions/${session.id}/gradebook`}>Gradebook</Link></p>
      <nav aria-label="Queue" className="mb-3 flex flex-wrap items-center gap-2 text-sm" data-testid="queue-nav">
        {around.previous ? <Link className="rounded border border-ink-soft px-3 py-1" to={`/sessions/${session.id}/review/${around.previous.id}`}>← Previous ({around.previous.group})</Link> : <span className="rounded border border-rule px-3 py-1 text-ink-soft">← Previous</span>}
        {around.next ? <Link className="rounded border border-ink-soft px-3 py-1" to={`/sessions/${session.id}/review/${around.next.id}`}>Next ({around.next.group}) →</Link> : <span className="rounded border border-rule px-3 py-1 text-ink-soft">Next →</span>}
        {around.nextFlagged ? <Link className="rounded bg-accent px-3 py-1 font-bold text-accent-ink" to={`/sessions/${session.id}/review/${around.nextFlagged.id}`}>Next flagged ({around.nextFlagged.group}) →</Link> : <span className="rounded border border-rule px-3 py-1 text-ink-soft">No other flagged version</span>}
        <span className="text-ink-soft">{around.position} of {around.of} in the queue</span>
      </nav>
      <PageTitle trail={trailFor(`${upperFirst(groupLabel(loaderData.group.name))}, version ${loaderData.view.version}`, loaderData.place.course, loaderData.place.practical, [{ label: "Review", to: `/sessions/${loaderData.session.id}/review` }])} sub={bench ? <>Bench {bench.label}: CA0 {sig(bench.CA0)} mol/L, CB0 {sig(bench.CB0)} mol/L, {FEED_RATIO_HEADER} = {sig(loaderData.feedRatio, 3)}, {sig(bench.temperatureC, 3)} °C</> : null}>
        {group.name}, version {view.version}
      </PageTitle>
      <p className="mb-4 flex flex-wrap items-center gap-3"><StatusBadge status={view.status} late={view.late} /> <span>{{ flagged: "⚠ flagged", "to-check": "◌ to check", checked: "✓ checked" }[tab]}</span></p>
      {actionData && "ok" in actionData ? <FormMessage tone="info">{actionData.ok}</FormMessage> : null}
      {err && !err.field ? <FormMessage tone="error">{err.error}</FormMessage> : null}
      {view.markingError ? (
        <div role="alert" className="mb-4 rounded border-l-4 border-bad bg-bad-soft px-4 py-3">
          <strong>Marking failed:</strong> {view.markingError}
          <Form method="post" className="mt-2"><input type="hidden" name="intent" value="mark-again" /><button type="submit" className="text-accent underline">Mark this version again</button></Form>
        </div>
      ) : null}
      {view.countsChosen ? (
        <Form method="post" className="mb-4 text-sm"><input type="hidden" name="intent" value="count-latest" />This version was chosen to count in the gradebook. <button type="submit" className="text-accent underline">Count the latest marked version instead</button></Form>
      ) : view.status === "marked" || view.parts?.overrideMark != null ? (
        <Form method="post" className="mb-4 text-sm"><input type="hidden" name="intent" value="count-this" />The gradebook counts the latest marked version unless a reviewer chooses one. <button type="submit" className="text-accent underline">Count this version</button></Form>
      ) : null}
      {view.status === "refused" ? <div role="alert" className="mb-4 rounded border-l-4 border-bad bg-bad-soft px-4 py-3"><strong>Refused:</strong> {view.problems[0]?.message}</div> : null}

      <div className="grid gap-6 lg:grid-cols-3">
        <section aria-labelledby="mark-h" className="min-w-0 rounded border border-rule bg-white p-4 lg:col-span-2">
          <h2 id="mark-h" className="text-xl font-bold">Mark {view.mark !== null ? <span className="num">{sig(view.mark, 3)} %</span> : "—"}{view.parts?.overrideMark !== null && view.parts?.overrideMark !== undefined ? " (set by a reviewer)" : ""}</h2>
          {view.parts ? (
            <div className="overflow-x-auto"><table className="mt-2 border-collapse text-left text-sm">
              <tbody>
                <tr className="border-b border-rule"><th className="py-1 pr-4">Experiment part</th><td className="num py-1">{partText(view.parts.experimentPart, outOf.experiment)}</td><td className="py-1 pl-4">{checks ? <>{MARKING_K_NAME} {sig(checks.kMarking)} against {sig(checks.kRefAtT)} {fit ? unitText(fit.kUnit) : ""} at the bench ({checks.experiment.deviationPct > 0 ? "+" : ""}{sig(checks.experiment.deviationPct, 3)} %, {checks.experiment.band})</> : null}</td></tr>
                <tr className="border-b border-rule"><th className="py-1 pr-4">Analysis part</th><td className="num py-1">{partText(view.parts.analysisPart, outOf.analysis)}</td><td className="py-1 pl-4">{checks ? <>reported {view.reportedK !== null ? sig(view.reportedK) : "nothing"}{view.reportedMethod ? ` (${methodText(view.reportedMethod)})` : ""} against {OWN_LINE_STAFF_NAME.toLowerCase()} <span data-own-line-k={checks.kLine}>{sig(checks.kLine)}</span> ({Number.isFinite(checks.analysis.deviationPct) ? `${sig(checks.analysis.deviationPct, 3)} %` : "—"}, {checks.analysis.band})</> : null}</td></tr>
                <tr className="border-b border-rule"><th className="py-1 pr-4">Late penalty</th><td className="num whitespace-nowrap py-1">{view.late ? `−${sig(view.parts.latePenalty, 3)} %` : "none"}</td><td /></tr>
                {correction ? <tr className="border-b border-rule"><th className="py-1 pr-4">Corrected slips</th><td className="num whitespace-nowrap py-1">−{sig(correction.marks, 3)} marks</td><td className="py-1 pl-4">{correction.count} × {sig(correction.pctEach, 3)} % of the mark</td></tr> : null}
                <tr><th className="py-1 pr-4">Automatic mark</th><td className="num whitespace-nowrap py-1">{sig(view.parts.autoMark, 3)} %</td><td className="py-1 pl-4">{view.overrideReason ? <>override: “{view.overrideReason}”</> : null}</td></tr>
              </tbody>
            </table></div>
          ) : null}
          {fit ? (
            <>
              <dl className="mt-3 space-y-1 text-sm">
                <div><dt className="inline font-bold">{MARKING_K_NAME}</dt> <dd className="inline"><strong className="num">{withInterval(fit.k, fit.kCI95)} {unitText(fit.kUnit)}</strong>: {markingKMethod(fit)}</dd></div>
                {view.ownLine ? <div><dt className="inline font-bold">{OWN_LINE_STAFF_NAME}</dt> <dd className="inline num">{withInterval(view.ownLine.k, view.ownLine.kCI95)} {unitText(fit.kUnit)}: {ownLineMethod(fit)} (the analysis check's k)</dd></div> : null}
                <div><dt className="inline font-bold">Curve fit</dt> <dd className="inline num">{withInterval(fit.nonlinear.k, fit.nonlinear.kCI95)}</dd></div>
              </dl>
              <p className="mt-1 text-sm">R² {sig(fit.r2, 5)}; {fit.n} readings; {sig(fit.fractionReacted * 100, 3)} % of the limiting reagent reacted; model: {modelText(fit.model)}.</p>
              <h3 className="mt-4 font-bold">Flags</h3>
              {flags.length ? <ul className="mt-1 space-y-1 text-sm">{flags.map((f) => (
                <li key={f.code} className="rounded border-l-4 border-warn bg-warn-soft px-3 py-1" data-flag={f.code}>
                  <strong>⚠ {flagTitle(f.code)}</strong>{f.fileRows.length ? <> ({fileRowsText(f.fileRows)} of the file)</> : null}: {f.message}
                  {f.code === "outlier" && f.fileRows.length === 1 ? (
                    <Form method="post" className="mt-1 flex flex-wrap items-center gap-2">
                      <input type="hidden" name="intent" value="exclude" />
                      <input type="hidden" name="row" value={f.fileRows[0]} />
                      <input type="hidden" name="reason" value="wild reading flagged by the engine" />
                      <button type="submit" disabled={busy} className="rounded border border-ink px-2 py-0.5 font-bold">Leave row {f.fileRows[0]} out and re-mark</button>
                    </Form>
                  ) : null}
                </li>
              ))}</ul> : <p className="text-sm">None.</p>}
              <h3 className="mt-4 font-bold">Feedback the group will read</h3>
              <ul className="mt-1 list-disc pl-6 text-sm">{view.feedback.map((l, i) => <li key={i}>{l}</li>)}</ul>
            </>
          ) : null}
          <ProblemList problems={view.status === "refused" ? [] : view.problems} limit={20} />
          {plots ? <RunPlotsView plots={plots} timeUnit={view.timeUnit} valueLabel={loaderData.valueLabel} concentrationUnit={view.concentrationUnit} measuresCA={view.measured === "concentrationA" || view.measured === "concentration"} /> : null}
        </section>

        <div className="space-y-6">
          <section aria-labelledby="override-h" className="rounded border border-rule bg-white p-4">
            <h2 id="override-h" className="text-lg font-bold">Override the mark</h2>
            <Form method="post">
              <input type="hidden" name="intent" value="override" />
              <label htmlFor="f-mark" className="mt-2 block font-bold">Mark, %</label>
              <input id="f-mark" name="mark" inputMode="decimal" className={input} defaultValue={view.parts?.overrideMark ?? ""} />
              <label htmlFor="f-override-reason" className="mt-2 block font-bold">Reason (kept in the audit log)</label>
              <textarea id="f-override-reason" name="reason" rows={2} className={input} aria-describedby={err?.field === "override" || err?.field === "mark" ? "override-error" : undefined} />
              {err?.field === "override" || err?.field === "mark" ? <p id="override-error" role="alert" className="mt-1 text-sm font-bold text-bad">✕ {err.error}</p> : null}
              <button type="submit" disabled={busy} className="mt-2 rounded bg-accent px-3 py-1 font-bold text-accent-ink">Set mark</button>
            </Form>
            {view.parts?.overrideMark !== null && view.parts?.overrideMark !== undefined ? (
              <Form method="post" className="mt-2"><input type="hidden" name="intent" value="clear-override" /><button type="submit" className="text-accent underline">Use the automatic mark again</button></Form>
            ) : null}
          </section>

          <section aria-labelledby="correct-h" className="rounded border border-rule bg-white p-4">
            <h2 id="correct-h" className="text-lg font-bold">Correct a slip and re-mark</h2>
            <p className="text-sm text-ink-soft">The engine marks the corrected readings again; the group reads the correction and its cost ({loaderData.correctionCostPct} % of the mark each, this practical's rule) in their feedback. The uploaded file stays as it was.</p>
            <Form method="post">
              <input type="hidden" name="intent" value="correct" />
              <fieldset className="mt-2">
                <legend className="font-bold">What is wrong</legend>
                {CORRECTION_KINDS.map((k) => (
                  <label key={k} className="flex items-center gap-2 text-sm"><input type="radio" name="kind" value={k} defaultChecked={k === "concentration-unit"} /> {CORRECTION_LABELS[k as CorrectionKind]}</label>
                ))}
              </fieldset>
              <div className="mt-2 grid grid-cols-2 gap-2 text-sm">
                <label htmlFor="f-to-conc" className="font-bold">Concentrations are in</label>
                <select id="f-to-conc" name="toConcentration" defaultValue={CONCENTRATION_UNITS.find((u) => u !== view.concentrationUnit)} className="rounded border border-ink-soft bg-white px-2 py-1">{CONCENTRATION_UNITS.map((u) => <option key={u} value={u}>{u}</option>)}</select>
                <label htmlFor="f-to-time" className="font-bold">Times are in</label>
                <select id="f-to-time" name="toTime" defaultValue={TIME_UNITS.find((u) => u !== view.timeUnit)} className="rounded border border-ink-soft bg-white px-2 py-1">{TIME_UNITS.map((u) => <option key={u} value={u}>{u}</option>)}</select>
                <label htmlFor="f-to-columns" className="font-bold">Time, value columns</label>
                <input id="f-to-columns" name="toColumns" placeholder="e.g. B, C" className="rounded border border-ink-soft px-2 py-1" />
                <label htmlFor="f-to-row" className="font-bold">Row in the file to leave out</label>
                <input id="f-to-row" name="toRow" inputMode="numeric" className="rounded border border-ink-soft px-2 py-1" />
              </div>
              <label htmlFor="f-correct-reason" className="mt-2 block font-bold">Why (the group reads this)</label>
              <input id="f-correct-reason" name="reason" className={input} />
              {err?.field === "correct" ? <p role="alert" className="mt-1 text-sm font-bold text-bad">✕ {err.error}</p> : null}
              <button type="submit" disabled={busy} className="mt-2 rounded bg-accent px-3 py-1 font-bold text-accent-ink">Correct and re-mark</button>
            </Form>
            {view.corrections?.length ? (
              <ul className="mt-3 space-y-1 text-sm" data-testid="corrections">
                {view.corrections.map((c, i) => <li key={i}>{correctionText({ kind: c.kind as CorrectionKind, from: c.from, to: c.to })}: {c.reason}</li>)}
              </ul>
            ) : null}
          </section>

          <section aria-labelledby="exclude-h" className="rounded border border-rule bg-white p-4">
            <h2 id="exclude-h" className="text-lg font-bold">Leave out a reading</h2>
            <Form method="post">
              <input type="hidden" name="intent" value="exclude" />
              <label htmlFor="f-row" className="mt-2 block font-bold">Row in the file</label>
              <p className="text-sm text-ink-soft">The row number in the uploaded file, as in the flags, the feedback and the plots' tooltips.</p>
              <input id="f-row" name="row" inputMode="numeric" className={input} />
              <label htmlFor="f-exclude-reason" className="mt-2 block font-bold">Reason</label>
              <input id="f-exclude-reason" name="reason" className={input} />
              {err?.field === "exclude" ? <p role="alert" className="mt-1 text-sm font-bold text-bad">✕ {err.error}</p> : null}
              <button type="submit" disabled={busy} className="mt-2 rounded bg-accent px-3 py-1 font-bold text-accent-ink">Leave out and re-mark</button>
            </Form>
            {excluded.length ? (
              <ul className="mt-3 space-y-1 text-sm">
                {excluded.map((e) => (
                  <li key={e.row} className="flex flex-wrap items-center gap-2">Row {e.row}: {e.reason}
                    <Form method="post"><input type="hidden" name="intent" value="include" /><input type="hidden" name="row" value={e.row} /><button type="submit" className="text-accent underline">put back</button></Form>
                  </li>
                ))}
              </ul>
            ) : null}
          </section>

          <section aria-labelledby="state-h" className="rounded border border-rule bg-white p-4">
            <h2 id="state-h" className="text-lg font-bold">Review state</h2>
            <Form method="post" className="mt-2">
              <input type="hidden" name="intent" value={tab === "checked" ? "unchecked" : "checked"} />
              <button type="submit" disabled={busy} className="rounded border border-ink px-3 py-1 font-bold">{tab === "checked" ? "Put back in the queue" : "Mark as checked"}</button>
            </Form>
          </section>

          <section aria-labelledby="comments-h" className="rounded border border-rule bg-white p-4">
            <h2 id="comments-h" className="text-lg font-bold">Comments</h2>
            {comments.length ? <ul className="mt-2 space-y-2 text-sm">{comments.map((c) => <li key={c.id}><strong>{c.author}</strong> <span className="text-ink-soft">{new Date(c.at).toLocaleString("en-GB", { timeZone: "UTC" })}</span><br />{c.body}</li>)}</ul> : <p className="text-sm text-ink-soft">None yet.</p>}
            <Form method="post" className="mt-2">
              <input type="hidden" name="intent" value="comment" />
              <label htmlFor="f-comment" className="block font-bold">Add a comment (staff only)</label>
              <textarea id="f-comment" name="body" rows={2} className={input} />
              {err?.field === "comment" ? <p role="alert" className="mt-1 text-sm font-bold text-bad">✕ {err.error}</p> : null}
              <button type="submit" disabled={busy} className="mt-2 rounded border border-ink px-3 py-1 font-bold">Add comment</button>
            </Form>
          </section>

          <section aria-labelledby="versions-h" className="rounded border border-rule bg-white p-4">
            <h2 id="versions-h" className="text-lg font-bold">Every version</h2>
            <ul className="mt-2 space-y-2 text-sm">
              {versions.map((v) => (
                <li key={v.id}>
                  {v.id === view.id ? <strong>v{v.version} (this one)</strong> : <Link className="text-accent underline" to={`/sessions/${session.id}/review/${v.id}`}>v{v.version}</Link>}{" "}
                  <StatusBadge status={v.status} late={v.late} /> {v.mark !== null ? <span className="num">{sig(v.mark, 3)} %</span> : null}<br />
                  <a className="text-accent underline" href={`/api/submissions/${v.id}/original`} download>{v.originalName}</a> <span className="text-ink-soft">({sig(v.size / 1024, 3)} kB, SHA-256 {v.sha256.slice(0, 12)}…)</span>
                </li>
              ))}
            </ul>
            {file ? <p className="mt-2 text-xs text-ink-soft break-all">This version: {file.type}, {file.size} bytes, SHA-256 {file.sha256}</p> : null}
          </section>
        </div>
      </div>
    </>
  );
}
