// A group's uploads for its practical: choose the readings file, map its columns and units (guessed
// from the header), say what was measured and the k the group worked out; a live preview (parsed
// and fitted on the server, nothing stored) shows the plots and the problems before submitting.
import { useEffect, useRef, useState } from "react";
import { Form, Link, redirect, useFetcher, useNavigation } from "react-router";
import type { Route } from "./+types/submissions";
import { requireUser } from "~/.server/guards.server";
import { pathId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { practicalFor, requireGroup } from "~/.server/submissions/context.server";
import { groupSubmissions } from "~/.server/submissions/list.server";
import { readUpload, MAX_UPLOAD_BYTES } from "~/.server/submissions/upload.server";
import { createSubmission } from "~/.server/submissions/service.server";
import { releaseInfo } from "~/.server/submissions/review.server";
import { PageTitle } from "~/components/page";
import { FormMessage } from "~/components/form";
import { ProblemList, RunPlotsView, StatusBadge } from "~/components/run-plots";
import { REPORTED_METHODS, methodText } from "~/lib/marking/feedback";
import type { RunPlots } from "~/lib/marking/plots";
import { sig, unitText, withInterval } from "~/lib/format";
import { lawFromOrders, rateConstantUnit, type FitResult } from "~/lib/kinetics";
import { groupLabel, upperFirst } from "~/lib/natural-order";
import { formatDateTime } from "~/lib/dates";
import { trailFor } from "~/lib/place";
import { coursePlace, practicalPlace } from "~/.server/place.server";

export const meta: Route.MetaFunction = () => [{ title: "Upload readings · Ratebook" }];

const MEASURED_TEXT: Record<string, string> = {
  concentration: "concentration of A",
  conductivity: "conductivity (the practical's signal)",
  absorbance: "absorbance",
  titration: "concentration from the titration",
  concentrationA: "concentration of A, worked out by the group",
};

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const groupId = pathId(params.groupId);
    const { group, viewer } = await requireGroup(user, groupId, false);
    const url = new URL(request.url);
    const sessionParam = url.searchParams.get("session");
    const practical = await practicalFor(groupId, sessionParam && /^\d+$/.test(sessionParam) ? Number(sessionParam) : null);
    const versions = await groupSubmissions(groupId, viewer, practical?.session.id);
    return {
      group: { id: group.id, name: group.name },
      place: practical ? await practicalPlace(practical.session.id) : await coursePlace(group.courseId),
      staff: viewer === "staff",
      maxBytes: MAX_UPLOAD_BYTES,
      practical: practical
        ? {
            sessionId: practical.session.id,
            title: practical.session.title,
            date: practical.session.date,
            deadline: practical.session.deadline ? practical.session.deadline.toISOString() : null,
            bench: practical.bench.label,
            CA0: practical.bench.CA0,
            CB0: practical.bench.CB0,
            temperatureC: practical.bench.temperatureC,
            measured: practical.system.measured,
            system: practical.system.name,
            kUnit: unitText(rateConstantUnit(lawFromOrders(practical.system.orderA, practical.system.orderB) ?? "first-order")),
            released: (await releaseInfo(practical.session.id)).releasedAt !== null,
          }
        : null,
      versions,
    };
  });
}

export async function action({ request, params }: Route.ActionArgs) {
  return whileDatabaseUp(false, async () => {
    const user = await requireUser(request);
    const groupId = pathId(params.groupId);
    await requireGroup(user, groupId, false);
    const { file, fields } = await readUpload(request, false);
    try {
      const created = await createSubmission(user, groupId, file, fields, true);
      return redirect(`/submissions/${created.id}`);
    } catch (thrown) {
      if (thrown instanceof Response && thrown.status === 400) {
        const body = (await thrown.json()) as { errors: Array<{ path: string; message: string }> };
        return { errors: body.errors };
      }
      throw thrown;
    }
  });
}

interface PreviewReply {
  columns: Array<{ number: number; letter: string; header: string; unit: string; numeric: boolean }>;
  time: { letter: string; header: string; unit: string } | null;
  value: { letter: string; header: string; unit: string } | null;
  timeUnit: string | null;
  concentrationUnit: string | null;
  refused: string | null;
  problems: Array<{ row: number; column: string; message: string }>;
  notes: string[];
  plots: RunPlots | null;
  n: number;
  fit: FitResult | null;
  fitErrors: Array<{ path: string; message: string }>;
  expectedLine: string;
  errors?: Array<{ path: string; message: string }>;
  error?: string;
}

const colText = (c: { letter: string; header: string }) => (c.header ? `${c.letter}: ${c.header}` : `column ${c.letter}`);

export default function GroupSubmissions({ loaderData, actionData }: Route.ComponentProps) {
  const { group, practical, versions, maxBytes } = loaderData;
  const formRef = useRef<HTMLFormElement>(null);
  const fetcher = useFetcher<PreviewReply>();
  const navigation = useNavigation();
  const [fileName, setFileName] = useState<string | null>(null);
  const [sizeError, setSizeError] = useState<string | null>(null);
  const [measured, setMeasured] = useState<string>(practical?.measured ?? "concentration");
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  // a preview about to be asked for: submitting waits for it (a navigation racing a fetcher
  // submission can leave the old page on screen)
  const [waiting, setWaiting] = useState(false);
  const preview = fetcher.data && !fetcher.data.errors && !fetcher.data.error ? fetcher.data : null;
  const previewErrors = fetcher.data?.errors ?? (fetcher.data?.error ? [{ path: "", message: fetcher.data.error }] : []);
  const submitErrors = actionData && "errors" in actionData ? actionData.errors : [];

  function refreshPreview() {
    const form = formRef.current;
    if (!form) return;
    const file = (form.elements.namedItem("file") as HTMLInputElement | null)?.files?.[0];
    if (!file) return;
    if (file.size > maxBytes) {
      setSizeError(`${file.name} is ${sig(file.size / (1024 * 1024), 3)} MB; the limit is ${maxBytes / (1024 * 1024)} MB. Save only the sheet with the readings.`);
      return;
    }
    setSizeError(null);
    if (timer.current) clearTimeout(timer.current);
    setWaiting(true);
    timer.current = setTimeout(() => {
      setWaiting(false);
      fetcher.submit(new FormData(form), { method: "post", action: `/api/groups/${group.id}/submissions/preview`, encType: "multipart/form-data" });
    }, 250);
  }
  useEffect(() => () => { if (timer.current) clearTimeout(timer.current); }, []);

  if (!practical) {
    return (
      <>
        <PageTitle trail={trailFor("Upload readings", loaderData.place.course)}>Upload readings</PageTitle>
        <p className="rounded border border-dashed border-rule p-6">{upperFirst(groupLabel(group.name))} has no bench in a practical yet. Your instructor assigns benches; come back after that. <Link className="text-accent underline" to="/dashboard">Back to the dashboard</Link></p>
      </>
    );
  }
  const fit = preview?.fit ?? null;
  const plots = preview?.plots ?? null;
  const deadline = practical.deadline ? new Date(practical.deadline) : null;
  const sending = navigation.state === "submitting";
  return (
    <>
      <PageTitle trail={trailFor("Upload readings", loaderData.place.course, loaderData.place.practical)} sub={<>{practical.title} · {practical.date} · bench {practical.bench}: CA0 {sig(practical.CA0)} mol/L, CB0 {sig(practical.CB0)} mol/L, {sig(practical.temperatureC, 3)} °C</>}>
        Upload readings: {group.name}
      </PageTitle>
      {deadline ? <p className="mb-4 text-sm">Deadline {formatDateTime(deadline, loaderData.place.course?.timeZone)}. Files sent later are accepted and marked late.</p> : null}

      {submitErrors.length ? <FormMessage tone="error">{submitErrors.map((e) => `${e.path ? `${e.path}: ` : ""}${e.message}`).join(" ")}</FormMessage> : null}

      <Form ref={formRef} method="post" encType="multipart/form-data" onChange={refreshPreview}
        onSubmit={() => { if (timer.current) clearTimeout(timer.current); }} className="grid gap-x-8 lg:grid-cols-2">
        <input type="hidden" name="sessionId" value={practical.sessionId} />
        <fieldset className="mb-4 rounded border border-rule bg-white p-4">
          <legend className="px-1 font-bold">1. The readings file</legend>
          <label htmlFor="f-file" className="block font-bold">CSV or .xlsx file</label>
          <p id="f-file-hint" className="text-sm text-ink-soft">Up to {maxBytes / (1024 * 1024)} MB. Comma, semicolon or tab between columns; a decimal comma is fine; a header row helps.</p>
          <input id="f-file" name="file" type="file" required accept=".csv,.txt,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
            aria-describedby="f-file-hint" className="mt-1 block w-full text-sm" onChange={(e) => setFileName(e.currentTarget.files?.[0]?.name ?? null)} />
          {sizeError ? <p role="alert" className="mt-1 text-sm font-bold text-bad">✕ {sizeError}</p> : null}
          {preview?.refused ? <p role="alert" className="mt-2 text-sm font-bold text-bad">✕ {preview.refused}</p> : null}
          {previewErrors.length ? <p role="alert" className="mt-2 text-sm font-bold text-bad">✕ {previewErrors.map((e) => e.message).join(" ")}</p> : null}
          {preview?.notes.length ? <p className="mt-2 text-sm text-ink-soft">{preview.notes.join(" ")}</p> : null}
        </fieldset>

        <fieldset className="mb-4 rounded border border-rule bg-white p-4">
          <legend className="px-1 font-bold">2. Columns and units</legend>
          <div className="grid gap-x-4 sm:grid-cols-2">
            <div className="mb-3">
              <label htmlFor="f-timeColumn" className="block font-bold">Time column</label>
              <select id="f-timeColumn" name="timeColumn" className="mt-1 w-full rounded border border-ink-soft bg-white px-2 py-2">
                <option value="">{preview?.time ? `Guess (now ${colText(preview.time)})` : "Guess from the header"}</option>
                {preview?.columns.filter((c) => c.numeric).map((c) => <option key={c.number} value={String(c.number)}>{colText(c)}</option>)}
              </select>
            </div>
            <div className="mb-3">
              <label htmlFor="f-valueColumn" className="block font-bold">Reading column</label>
              <select id="f-valueColumn" name="valueColumn" className="mt-1 w-full rounded border border-ink-soft bg-white px-2 py-2">
                <option value="">{preview?.value ? `Guess (now ${colText(preview.value)})` : "Guess from the header"}</option>
                {preview?.columns.filter((c) => c.numeric).map((c) => <option key={c.number} value={String(c.number)}>{colText(c)}</option>)}
              </select>
            </div>
            <div className="mb-3">
              <label htmlFor="f-timeUnit" className="block font-bold">Time unit</label>
              <select id="f-timeUnit" name="timeUnit" className="mt-1 w-full rounded border border-ink-soft bg-white px-2 py-2">
                <option value="">{preview?.timeUnit ? `From the header (now ${preview.timeUnit})` : "From the header (else s)"}</option>
                <option value="s">s</option><option value="min">min</option><option value="h">h</option>
              </select>
            </div>
            <div className="mb-3">
              <label htmlFor="f-concentrationUnit" className="block font-bold">Concentration unit</label>
              <select id="f-concentrationUnit" name="concentrationUnit" className="mt-1 w-full rounded border border-ink-soft bg-white px-2 py-2">
                <option value="">{preview?.concentrationUnit ? `From the header (now ${preview.concentrationUnit})` : "From the header (else mol/L)"}</option>
                <option value="mol/L">mol/L</option><option value="mmol/L">mmol/L</option>
              </select>
            </div>
          </div>
          <div className="mb-3">
            <label htmlFor="f-startTime" className="block font-bold">Clock time of mixing <span className="font-normal text-ink-soft">(only when the times are clock times and the first reading was not at mixing)</span></label>
            <input id="f-startTime" name="startTime" type="text" inputMode="numeric" placeholder="hh:mm:ss, e.g. 14:02:30" autoComplete="off" className="mt-1 w-full rounded border border-ink-soft bg-white px-2 py-2" />
          </div>
          <div className="mb-3">
            <label htmlFor="f-measured" className="block font-bold">What the reading column holds</label>
            <select id="f-measured" name="measured" value={measured} onChange={(e) => setMeasured(e.currentTarget.value)} className="mt-1 w-full rounded border border-ink-soft bg-white px-2 py-2">
              <option value={practical.measured}>{MEASURED_TEXT[practical.measured] ?? practical.measured}</option>
              {practical.measured !== "concentration" ? <option value="concentrationA">{MEASURED_TEXT.concentrationA}</option> : null}
            </select>
          </div>
        </fieldset>

        <fieldset className="mb-4 rounded border border-rule bg-white p-4 lg:col-span-2">
          <legend className="px-1 font-bold">3. Your own result (optional, marked in the analysis part)</legend>
          <div className="grid gap-x-4 sm:grid-cols-2">
            <div className="mb-3">
              <label htmlFor="f-reportedK" className="block font-bold">k you worked out, in {practical.kUnit}</label>
              <input id="f-reportedK" name="reportedK" inputMode="decimal" placeholder="e.g. 0.0153" className="mt-1 w-full rounded border border-ink-soft bg-white px-3 py-2" />
            </div>
            <div className="mb-3">
              <label htmlFor="f-reportedMethod" className="block font-bold">The plot you used</label>
              <select id="f-reportedMethod" name="reportedMethod" className="mt-1 w-full rounded border border-ink-soft bg-white px-2 py-2">
                <option value="">(not given)</option>
                {Object.entries(REPORTED_METHODS).map(([k, v]) => <option key={k} value={k}>{v}</option>)}
              </select>
            </div>
          </div>
        </fieldset>

        <div className="mb-6 lg:col-span-2">
          <button type="submit" disabled={sending || !fileName || !!sizeError || waiting || fetcher.state !== "idle" || !!preview?.refused} className="rounded bg-accent px-4 py-2 font-bold text-accent-ink hover:opacity-90 disabled:opacity-60">
            {sending ? "Sending…" : "Submit these readings"}
          </button>
          <span className="ml-3 text-sm text-ink-soft">{fetcher.state !== "idle" || waiting ? "Updating the preview…" : preview?.refused ? "This file cannot be sent as it is: put right what the preview says, or choose another file." : fileName ? "The preview below shows what will be marked." : "Choose a file to see a preview."}</span>
        </div>
      </Form>

      {preview && !preview.refused ? (
        <section aria-labelledby="preview-h" className="mb-8 rounded border border-rule bg-white p-4">
          <h2 id="preview-h" className="text-xl font-bold">Preview (not stored yet)</h2>
          <p className="mt-1 text-sm">{preview.n} readings from {preview.time ? colText(preview.time) : "?"} ({preview.timeUnit}) and {preview.value ? colText(preview.value) : "?"}.</p>
          <ProblemList problems={preview.problems} limit={20} />
          {preview.fitErrors.length ? <p role="alert" className="mt-2 font-bold text-bad">✕ {preview.fitErrors.map((e) => `${e.path}: ${e.message}`).join("; ")}</p> : null}
          {fit ? (
            <>
              <p className="mt-3">k from the straight line: <strong className="num">{withInterval(fit.k, fit.kCI95)} {unitText(fit.kUnit)}</strong>; straight line for this feed: {methodText(fit.line.form)}.</p>
              {fit.flags.length ? (
                <ul className="mt-2 space-y-1 text-sm">{fit.flags.map((f) => <li key={f.code} className="rounded border-l-4 border-warn bg-warn-soft px-3 py-1">⚠ {f.message}</li>)}</ul>
              ) : null}
              {plots ? <RunPlotsView plots={plots} timeUnit={preview.timeUnit ?? "s"} valueLabel={preview.value?.header || (measured === "concentrationA" ? "CA" : measured)} concentrationUnit={preview.concentrationUnit ?? "mol/L"} measuresCA={measured === "concentrationA" || practical.measured === "concentration"} /> : null}
            </>
          ) : null}
        </section>
      ) : null}

      <section aria-labelledby="versions-h">
        <h2 id="versions-h" className="mb-2 text-xl font-bold">Sent so far</h2>
        {versions.length === 0 ? (
          <p className="rounded border border-dashed border-rule p-4 text-ink-soft">Nothing yet. Choose your readings file above.</p>
        ) : (
          <ul className="space-y-2">
            {versions.map((v) => (
              <li key={v.id} className="flex flex-wrap items-center gap-x-4 gap-y-1 rounded border border-rule bg-white px-3 py-2">
                <Link className="font-bold text-accent underline" to={`/submissions/${v.id}`}>Version {v.version}</Link>
                <StatusBadge status={v.status} late={v.late} />
                <span className="text-sm">{v.originalName}</span>
                <span className="text-sm text-ink-soft">{new Date(v.submittedAt).toLocaleString("en-GB", { timeZone: "UTC" })} UTC</span>
                {v.mark !== null ? <span className="num text-sm font-bold">{sig(v.mark, 3)} %</span> : null}
              </li>
            ))}
          </ul>
        )}
        {practical.released ? <p className="mt-2 text-sm">Marks for this practical are released: open a version to read its feedback.</p> : null}
      </section>
    </>
  );
}
