// A run's plots for groups and reviewers: the straight line the group would draw, the readings
// with the fitted curve, CA(t) from the model, and the residuals. Server-rendered SVG (XYPlot).
import type { RunPlots } from "~/lib/marking/plots";
import { XYPlot } from "./xy-plot";
import { sig } from "~/lib/format";

export function RunPlotsView({ plots, timeUnit, valueLabel, concentrationUnit, measuresCA }: {
  /** measuresCA: the readings are concentrations of A already, so the CA(t) plot would repeat them */
  plots: RunPlots; timeUnit: string; valueLabel: string; concentrationUnit: string; measuresCA: boolean;
}) {
  const t = `time / ${timeUnit}`;
  // tooltips name each reading by its row in the uploaded file (the numbering of every flag and form)
  const tips = (rows: number[] | undefined, pts: Array<[number, number]>, what: string) =>
    rows ? pts.map((p, i) => `Row ${rows[i]} of the file: t = ${sig(p[0], 4)} ${timeUnit}, ${what} ${sig(p[1], 4)}`) : undefined;
  // XYPlot draws at the width it is shown at, so its text stays at 11 px or more on a phone
  // without a scrolling box (which keyboard users would have to reach).
  return (
    <div className="grid gap-x-6 lg:grid-cols-2 [&>*]:min-w-0">
      <XYPlot title="Straight-line plot for this feed, with the fitted line" xLabel={t} yLabel={plots.line.yLabel} points={plots.line.points} curve={plots.line.curve} pointLabels={tips(plots.line.rows, plots.line.points, "y")} />
      <XYPlot title="Readings against time with the fitted curve" xLabel={t} yLabel={valueLabel} points={plots.readings.points} curve={plots.readings.curve} pointLabels={tips(plots.readings.rows, plots.readings.points, "reading")} />
      {!measuresCA ? (
        <XYPlot title="Concentration of A from the fitted model" xLabel={t} yLabel={`CA / (${concentrationUnit})`} points={[]} curve={plots.concentration} />
      ) : null}
      <XYPlot title="Residuals of the curve fit (reading minus model)" xLabel={t} yLabel={`residual, ${valueLabel}`} points={plots.residuals} zeroLine height={220} pointLabels={tips(plots.residualFileRows, plots.residuals, "residual")} />
    </div>
  );
}

export function ProblemList({ problems, limit = 50 }: { problems: Array<{ row: number; column: string; message: string }>; limit?: number }) {
  if (!problems.length) return null;
  return (
    <div className="mt-4 rounded border-l-4 border-warn bg-warn-soft px-4 py-3">
      <p className="font-bold"><span aria-hidden="true">⚠ </span>{problems.length === 1 ? "One row could not be used" : `${problems.length} rows could not be used`}; the others were read.</p>
      <ul className="mt-2 list-disc pl-6 text-sm">
        {problems.slice(0, limit).map((p, i) => (
          <li key={i}>{p.row ? <>Row {p.row}{p.column ? <>, column {p.column}</> : null}: </> : null}{p.message}</li>
        ))}
        {problems.length > limit ? <li>… and {problems.length - limit} more.</li> : null}
      </ul>
    </div>
  );
}

export function StatusBadge({ status, late }: { status: string; late?: boolean }) {
  const text: Record<string, string> = { queued: "◌ received, being marked", marked: "✓ marked", refused: "✕ refused", failed: "✕ marking failed" };
  return (
    <span className="inline-flex flex-wrap gap-1">
      <span className={`rounded border px-2 py-0.5 text-sm ${status === "refused" || status === "failed" ? "border-bad text-bad" : "border-ink-soft"}`}>{text[status] ?? status}</span>
      {late ? <span className="rounded border border-warn px-2 py-0.5 text-sm text-warn">late</span> : null}
    </span>
  );
}
