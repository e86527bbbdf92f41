// The dashboard's live table of practicals open for uploads: groups uploaded, versions, being
// marked, marked, flagged. The first figures come with the page; then a fetcher asks
// GET /dashboard/live every few seconds while the tab is visible, and stops while it is hidden.
import { useEffect, useRef } from "react";
import { Link, useFetcher } from "react-router";
import { TableBox } from "./page";
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
        <TableBox label="Practicals open for uploads">
          <table className="w-full border-collapse text-left" data-testid="live-table">
            <thead>
              <tr className="border-b-2 border-ink">
                <th className="px-3 py-2">Practical</th>
                <th className="px-3 py-2">Course</th>
                <th className="px-3 py-2">Lab day</th>
                <th className="num px-3 py-2">Groups uploaded</th>
                <th className="num px-3 py-2">Versions</th>
                <th className="num px-3 py-2">Being marked</th>
                <th className="num px-3 py-2">Marked</th>
                <th className="num px-3 py-2">Flagged</th>
                <th className="px-3 py-2">Last upload</th>
              </tr>
            </thead>
            <tbody>
              {figures.practicals.map((p) => (
                <tr key={p.id} className="border-b border-rule" data-practical={p.id}>
                  <td className="px-3 py-2"><Link className="font-bold text-accent underline" to={`/sessions/${p.id}/review`}>{p.title}</Link></td>
                  <td className="px-3 py-2 whitespace-nowrap"><Link className="underline" to={`/courses/${p.courseId}`}>{p.courseCode}</Link></td>
                  <td className="px-3 py-2 whitespace-nowrap">{p.date}</td>
                  <td className="num px-3 py-2" data-figure="uploaded">{p.uploaded} of {p.groups}</td>
                  <td className="num px-3 py-2" data-figure="versions">{p.versions}</td>
                  <td className="num px-3 py-2" data-figure="being-marked">{p.beingMarked}</td>
                  <td className="num px-3 py-2" data-figure="marked">{p.marked}</td>
                  <td className="num px-3 py-2" data-figure="flagged">{p.flagged ? <Link className="font-bold text-warn underline" to={`/sessions/${p.id}/review?tab=flagged`}>{p.flagged}</Link> : 0}</td>
                  <td className="px-3 py-2 whitespace-nowrap">{when(p.lastUploadAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </TableBox>
      )}
    </section>
  );
}
