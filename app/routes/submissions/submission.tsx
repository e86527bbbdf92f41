// One submitted version for its group (and staff): before release "received, version N", the
// problems found and the preview fit; after release the mark, its parts, the fitted k with its
// 95 % interval, the plots and the feedback lines.
import { Link } from "react-router";
import type { Route } from "./+types/submission";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { loadSubmission } from "~/.server/submissions/access.server";
import { releaseInfo } from "~/.server/submissions/review.server";
import { submissionView } from "~/.server/submissions/view.server";
import { plotsOf, valueLabel } from "~/.server/submissions/page-data.server";
import { SubmissionFile } from "~/.server/db/submissions.server";
import { PageTitle } from "~/components/page";
import { ProblemList, RunPlotsView, StatusBadge } from "~/components/run-plots";
import { sig, unitText, withInterval } from "~/lib/format";
import { methodText } from "~/lib/marking/feedback";
import { MARKING_K_NAME, OWN_LINE_NAME, markingKMethod, ownLineMethod } from "~/lib/marking/estimators";
import { marksOutOf, partText } from "~/lib/marking/rubric-view";
import { rubricFrom } from "~/lib/marking/rubric";
import { LabSession } from "~/.server/db/lab-sessions.server";
import { groupLabel, upperFirst } from "~/lib/natural-order";
import { trailFor } from "~/lib/place";
import { practicalPlace } from "~/.server/place.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data ? `Version ${data.view.version} · ` : ""}Submission · Ratebook` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const id = pathId(params.submissionId);
    const { submission, group, viewer } = await loadSubmission(user, id, false);
    const file = await SubmissionFile.findByPk(id, { attributes: ["originalName", "size"] });
    const view = submissionView(submission, viewer, await releaseInfo(submission.sessionId), file?.originalName ?? null);
    const practical = await LabSession.findByPk(submission.sessionId, { attributes: ["id", "rubric"] });
    return {
      view,
      outOf: marksOutOf(rubricFrom(practical?.rubric)),
      group: { id: group.id, name: group.name },
      place: await practicalPlace(submission.sessionId),
      staff: viewer === "staff",
      size: file?.size ?? 0,
      plots: plotsOf(submission, view.fit),
      valueLabel: valueLabel(submission),
    };
  });
}

export default function SubmissionPage({ loaderData }: Route.ComponentProps) {
  const { view, group, staff, plots, size, outOf } = loaderData;
  const showMark = staff || view.released;
  const fit = view.fit;
  return (
    <>
      <p className="mb-2 text-sm"><Link className="text-accent underline" to={`/groups/${group.id}/submissions`}>← {group.name}: uploads</Link></p>
      <PageTitle trail={trailFor(`Version ${view.version}`, loaderData.place.course, loaderData.place.practical, [{ label: `${upperFirst(groupLabel(group.name))}: uploads`, to: `/groups/${group.id}/submissions?session=${view.sessionId}` }])} sub={<>{upperFirst(groupLabel(group.name))} · sent {new Date(view.submittedAt).toLocaleString("en-GB", { timeZone: "UTC" })} UTC · {view.originalName} ({sig(size / 1024, 3)} kB)</>}>
        {view.status === "refused" ? `Version ${view.version}: not accepted` : showMark && view.mark !== null ? `Version ${view.version}: feedback` : `Received, version ${view.version}`}
      </PageTitle>
      <p className="mb-4"><StatusBadge status={view.status} late={view.late} /></p>
      {staff ? <p className="mb-4"><Link className="text-accent underline" to={`/sessions/${view.sessionId}/review/${view.id}`}>Open in the review</Link></p> : null}

      {view.status === "refused" ? (
        <div role="alert" className="rounded border-l-4 border-bad bg-bad-soft px-4 py-3">
          <p className="font-bold">The file could not be used:</p>
          <p>{view.problems[0]?.message}</p>
          <p className="mt-2"><Link className="text-accent underline" to={`/groups/${group.id}/submissions`}>Upload a corrected file</Link> (this one is kept).</p>
        </div>
      ) : null}

      {view.status === "failed" ? (
        <div role="alert" className="mb-4 rounded border-l-4 border-bad bg-bad-soft px-4 py-3">
          <p className="font-bold">This version could not be marked:</p>
          <p>{view.markingError}</p>
          <p className="mt-2"><Link className="text-accent underline" to={`/groups/${group.id}/submissions`}>Upload a corrected file</Link> (this one is kept). Your instructor sees this too.</p>
        </div>
      ) : null}

      {!showMark && view.status !== "refused" && view.status !== "failed" ? (
        <p className="rounded border-l-4 border-accent bg-accent-soft px-4 py-3">
          Your readings are stored. Marks and feedback appear here when your instructor releases them; until then you see what Ratebook read from your file.
        </p>
      ) : null}

      {showMark && view.mark !== null ? (
        <section aria-labelledby="mark-h" className="mt-6 rounded border border-rule bg-white p-4">
          <h2 id="mark-h" className="text-2xl font-bold">Mark: <span className="num">{sig(view.mark, 3)} %</span></h2>
          <table className="mt-3 border-collapse text-left">
            <tbody>
              <tr className="border-b border-rule"><th className="py-1 pr-6">Experiment (the marking k against the value for your bench)</th><td className="num whitespace-nowrap py-1">{partText(view.parts?.experimentPart, outOf.experiment)}</td></tr>
              <tr className="border-b border-rule"><th className="py-1 pr-6">Analysis (your reported k against your straight line)</th><td className="num whitespace-nowrap py-1">{partText(view.parts?.analysisPart, outOf.analysis)}</td></tr>
              {view.late ? <tr className="border-b border-rule"><th className="py-1 pr-6">Late penalty</th><td className="num whitespace-nowrap py-1">−{sig(view.parts?.latePenalty, 3)} marks</td></tr> : null}
              {view.parts?.overrideMark !== null && view.parts?.overrideMark !== undefined ? <tr><th className="py-1 pr-6">Set by a reviewer</th><td className="num whitespace-nowrap py-1">{sig(view.parts.overrideMark, 3)} %</td></tr> : null}
            </tbody>
          </table>
          {view.kRefAtT ? <p className="mt-2 text-sm">Expected k at your bench's temperature: <span className="num">{sig(view.kRefAtT)}</span> {fit ? unitText(fit.kUnit) : ""}</p> : null}
          <h3 className="mt-4 text-lg font-bold">Feedback</h3>
          <ul className="mt-2 space-y-2">
            {view.feedback.map((line, i) => <li key={i} className="rounded border-l-4 border-rule bg-paper px-3 py-2">{line}</li>)}
          </ul>
        </section>
      ) : null}

      <ProblemList problems={view.status === "refused" ? [] : view.problems} />

      {fit ? (
        <section aria-labelledby="fit-h" className="mt-6 rounded border border-rule bg-white p-4">
          <h2 id="fit-h" className="text-xl font-bold">{showMark ? "Your run" : "What Ratebook read (preview)"}</h2>
          <table className="mt-3 border-collapse text-left">
            <tbody>
              {view.ownLine ? <tr className="border-b border-rule" data-estimator="own-line"><th className="py-1 pr-6">{OWN_LINE_NAME}: k<br /><span className="text-sm font-normal text-ink-soft">{ownLineMethod(fit)}; your reported k is checked against this</span></th><td className="num py-1" data-k={view.ownLine.k}>{withInterval(view.ownLine.k, view.ownLine.kCI95)} {unitText(fit.kUnit)}</td></tr> : null}
              <tr className="border-b border-rule" data-estimator="marking-k"><th className="py-1 pr-6">{MARKING_K_NAME}<br /><span className="text-sm font-normal text-ink-soft">{markingKMethod(fit)}</span></th><td className="num py-1">{withInterval(fit.k, fit.kCI95)} {unitText(fit.kUnit)}</td></tr>
              <tr className="border-b border-rule"><th className="py-1 pr-6">Readings used</th><td className="num py-1">{fit.n}</td></tr>
              {view.reportedK !== null ? <tr className="border-b border-rule"><th className="py-1 pr-6">k you reported</th><td className="num py-1">{sig(view.reportedK)} {unitText(fit.kUnit)}{view.reportedMethod ? ` (from ${methodText(view.reportedMethod)})` : ""}</td></tr> : null}
              <tr><th className="py-1 pr-6">Limiting reagent reacted by the last reading</th><td className="num py-1">{sig(fit.fractionReacted * 100, 3)} %</td></tr>
            </tbody>
          </table>
          {plots ? <RunPlotsView plots={plots} timeUnit={view.timeUnit} valueLabel={loaderData.valueLabel} concentrationUnit={view.concentrationUnit} measuresCA={view.measured === "concentrationA" || view.measured === "concentration"} /> : null}
        </section>
      ) : view.status === "queued" ? <p className="mt-4 text-ink-soft">Ratebook is fitting your readings; reload in a moment.</p> : null}
    </>
  );
}
