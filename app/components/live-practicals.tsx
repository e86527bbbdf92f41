// The dashboard's live figures of practicals open for uploads: groups uploaded, versions, being
// marked, marked, flagged. The first figures come with the page; then a fetcher asks
// GET /dashboard/live every few seconds while the tab is visible, and stops while it is hidden.
import { useEffect, useRef, type ReactNode } from "react";
import { Link, useFetcher } from "react-router";
import { LIVE_POLL_MS, type LiveFigures } from "~/lib/dashboard/live-figures";

/** Calls `tick` every `ms` while the document is visible; on becoming visible again, at once. */
export function useWhileVisible(tick: () => void, ms: number) {
  const saved = useRef(tick);
  saved.current = tick;
  useEffect(() => {
    let timer: ReturnType<typeof setInterval> | null = null;
    const start = () => {
      if (timer === null) timer = setInterval(() => saved.current(), ms);
    };
    const stop = () => {
      if (timer !== null) clearInterval(timer);
      timer = null;
    };
    const onVisibility = () => {
      if (document.visibilityState === "hidden") stop();
      else {
        saved.current();
        start();
      }
    };
    if (document.visibilityState !== "hidden") start();
    document.addEventListener("visibilitychange", onVisibility);
    return () => {
      stop();
      document.removeEventListener("visibilitychange", onVisibility);
    };
  }, [ms]);
}

function Figure({ label, name, children }: { label: string; name: string; children: ReactNode }) {
  return (
    <div>
      <dt className="text-sm text-ink-soft">{label}</dt>
      <dd className="text-xl font-bold tabular-nums" data-figure={name}>{children}</dd>
    </div>
  );
}

const time = (iso: string) => `${iso.slice(11, 19)} UTC`;
const when = (iso: string | null) => (iso ? `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC` : "—");

export function LivePracticals({ initial }: { initial: LiveFigures }) {
  const fetcher = useFetcher<LiveFigures | { error: string }>();
  useWhileVisible(() => {
    if (fetcher.state === "idle") fetcher.load("/dashboard/live");
  }, LIVE_POLL_MS);
  // A failed refresh (signed out elsewhere, database restarting) keeps the last figures and says why.
  const last = useRef(initial);
  const reply = fetcher.data;
  if (reply && "practicals" in reply) last.current = reply;
  const figures = last.current;
  const problem = reply && "error" in reply ? reply.error : null;
  return (
    <section aria-labelledby="live-h" className="mb-8">
      <div className="mb-3 flex flex-wrap items-baseline gap-x-4">
        <h2 id="live-h" className="text-xl font-bold">Practicals open for uploads</h2>
        <p className="text-sm text-ink-soft" data-testid="live-at">Figures as of {time(figures.at)}; refreshed every {LIVE_POLL_MS / 1000} s while this tab is shown.</p>
      </div>
      {problem ? <p className="mb-3 text-sm font-bold text-bad" data-testid="live-problem">Could not refresh the figures: {problem}</p> : null}
      {figures.practicals.length === 0 ? (
        <p className="rounded border border-dashed border-rule p-6 text-ink-soft">No practical of your courses is open for uploads (planned or groups told) right now.</p>
      ) : (
        <ul className="grid gap-3 md:grid-cols-2" aria-label="Practicals open for uploads">
          {figures.practicals.map((p) => (
            <li key={p.id} className="rounded border border-rule bg-white p-4" data-practical={p.id}>
              <p className="font-bold"><Link className="text-accent underline" to={`/sessions/${p.id}/review`}>{p.title}</Link></p>
              <p className="text-sm text-ink-soft">{p.courseCode} · lab day {p.date} · {p.status === "notified" ? "groups told" : "planned"} · last upload {when(p.lastUploadAt)}</p>
              <dl className="mt-3 grid grid-cols-3 gap-x-3 gap-y-2">
                <Figure label="Groups uploaded" name="uploaded">{p.uploaded} of {p.groups}</Figure>
                <Figure label="Versions" name="versions">{p.versions}</Figure>
                <Figure label="Being marked" name="being-marked">{p.beingMarked}</Figure>
                <Figure label="Marked" name="marked">{p.marked}</Figure>
                <Figure label="Flagged" name="flagged">{p.flagged ? <Link className="text-warn underline" to={`/sessions/${p.id}/review?tab=flagged`}>{p.flagged}</Link> : 0}</Figure>
              </dl>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
