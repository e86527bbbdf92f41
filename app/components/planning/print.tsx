// Printable pieces: the paper choice, hazard cautions, and one bench sheet.
import { Link } from "react-router";
import type { Hazards, Paper, SheetsData } from "~/.server/planning/sheets.server";
import { fixed, minutes, mL } from "~/lib/planning/format";
import { CLOSING_CAUTION } from "~/lib/planning/hazards";
import { groupLabel } from "~/lib/natural-order";

export function PrintBar({ paper, base, extra }: { paper: Paper; base: string; extra?: React.ReactNode }) {
  return (
    <div className="no-print mb-6 flex flex-wrap items-center gap-3 rounded border border-rule bg-white p-3">
      <span className="font-bold">Paper:</span>
      {(["a4", "letter"] as const).map((p) => (
        <Link key={p} to={`${base}${base.includes("?") ? "&" : "?"}paper=${p}`} aria-current={p === paper ? "true" : undefined} className={`rounded border px-3 py-1 ${p === paper ? "border-ink bg-accent-soft font-bold" : "border-ink-soft"}`}>
          {p === "a4" ? "A4" : "US Letter"}
        </Link>
      ))}
      {extra}
      <span className="text-sm text-ink-soft">Print from the browser (Ctrl+P); each bench starts a new page.</span>
    </div>
  );
}

export function HazardCautions({ hazards }: { hazards: Hazards }) {
  return (
    <section aria-label="Hazard cautions" className="mt-4 rounded border-2 border-ink p-3 print-plain">
      <h3 className="font-bold">⚠ Hazard cautions</h3>
      {hazards.length ? (
        <ul className="mt-1 space-y-1 text-sm">
          {hazards.map((h) => (
            <li key={h.reagent}>
              <span className="font-bold">{h.reagent}</span>
              {h.pictograms.length ? <> — pictograms: {h.pictograms.join(", ")}</> : null}
              {h.statements.length ? <> — {h.statements.join(" ")}</> : null}
              {h.handling ? <> {h.handling}</> : null}
            </li>
          ))}
        </ul>
      ) : (
        <p className="text-sm">No hazards are recorded for these reagents; check each safety data sheet.</p>
      )}
      <p className="mt-2 text-sm">Wear eye protection and a lab coat; report spills at once. <strong>{CLOSING_CAUTION}</strong></p>
    </section>
  );
}

type Sheet = SheetsData["sheets"][number];

export function BenchSheet({ d, sheet }: { d: Omit<SheetsData, "sheets">; sheet: Sheet }) {
  const { session, reaction } = d;
  const v = sheet.volumes;
  const V = session.reactorVolumeMl;
  const deadline = session.deadline ? `${session.deadline.slice(0, 16).replace("T", " ")} UTC` : "the date your instructor gives";
  return (
    <article className="sheet mb-10 rounded border border-rule bg-white p-6 text-black print-plain print:mb-0 print:p-0" aria-label={`Bench sheet, bench ${sheet.label}`}>
      <header className="border-b-2 border-black pb-2">
        <p className="text-sm">{d.course.code} · {session.title} · {session.date}</p>
        <h2 className="text-2xl font-bold">Bench {sheet.label}{sheet.group ? ` · ${sheet.group}` : ""}</h2>
        <p className="text-sm">{reaction.name}: {reaction.a === 1 ? "" : `${reaction.a} `}A + {reaction.b === 1 ? "" : `${reaction.b} `}B → products; A = {reaction.speciesA}, B = {reaction.speciesB}</p>
      </header>
      <div className="mt-3 grid gap-4 sm:grid-cols-2">
        <section aria-label="Feed">
          <h3 className="font-bold">Your feed</h3>
          <table className="text-sm">
            <tbody>
              <tr><th className="pr-3 text-left font-normal">CA0 (in the reactor)</th><td className="num">{fixed(sheet.CA0, 4)} mol/L</td></tr>
              <tr><th className="pr-3 text-left font-normal">CB0 (in the reactor)</th><td className="num">{fixed(sheet.CB0, 4)} mol/L</td></tr>
              <tr><th className="pr-3 text-left font-normal">Temperature</th><td className="num">{fixed(sheet.temperatureC, 1)} °C</td></tr>
              <tr><th className="pr-3 text-left font-normal">Reactor volume</th><td className="num">{fixed(V, 0)} mL</td></tr>
            </tbody>
          </table>
        </section>
        <section aria-label="Volumes to mix">
          <h3 className="font-bold">Volumes to mix (C1·V1 = C2·V2)</h3>
          <ul className="text-sm">
            <li>Stock A ({fixed(session.stockAMolL, 3)} mol/L): V1 = {fixed(sheet.CA0, 4)} × {fixed(V, 0)} / {fixed(session.stockAMolL, 3)} = <strong>{mL(v.stockAMl)}</strong></li>
            <li>Stock B ({fixed(session.stockBMolL, 3)} mol/L): V1 = {fixed(sheet.CB0, 4)} × {fixed(V, 0)} / {fixed(session.stockBMolL, 3)} = <strong>{mL(v.stockBMl)}</strong></li>
            <li>Water: {fixed(V, 0)} − {fixed(v.stockAMl, 1)} − {fixed(v.stockBMl, 1)} = <strong>{mL(v.waterMl)}</strong></li>
          </ul>
          <p className="mt-1 text-sm">Bring A (with the water) and B to {fixed(sheet.temperatureC, 1)} °C separately; start the clock when B goes in.</p>
        </section>
      </div>
      <section aria-label="Sampling plan" className="mt-4">
        <h3 className="font-bold">Sampling plan: every {session.samplingIntervalS} s for {sheet.planMinutes} min ({session.slotMinutes - session.setupMinutes} min are left after set-up)</h3>
        <p className="text-sm">{sheet.expectedMinutes !== null ? `Expected to reach ${Math.round(session.targetConversion * 100)} % conversion in about ${minutes(sheet.expectedMinutes)}. ` : ""}Record the {reaction.upload} at each time.</p>
        <div className="mt-1 grid grid-cols-3 gap-x-4 text-sm tabular-nums sm:grid-cols-6 print:grid-cols-6">
          {sheet.samples.slice(0, 60).map((t) => (
            <div key={t} className="flex justify-between border-b border-black/40 py-0.5"><span>{fixed(t / 60, t % 60 ? 1 : 0)} min</span><span aria-hidden="true">______</span></div>
          ))}
        </div>
        {sheet.samples.length > 60 ? <p className="mt-1 text-sm">…and on every {session.samplingIntervalS} s after that until {sheet.planMinutes} min.</p> : null}
      </section>
      <section aria-label="What to upload" className="mt-4 text-sm">
        <h3 className="font-bold">What to upload, and by when</h3>
        <p>One CSV or .xlsx file per group: a column of times (s or min) and a column of {reaction.upload}, with a header row. Upload it on Ratebook by <strong>{deadline}</strong>{sheet.groupId ? <>: <Link className="font-bold underline" to={`/groups/${sheet.groupId}/submissions`}>upload page of {sheet.group ? groupLabel(sheet.group) : "your group"}</Link> <span className="hidden print:inline">({`/groups/${sheet.groupId}/submissions`})</span></> : null}.</p>
      </section>
      <HazardCautions hazards={d.hazards} />
    </article>
  );
}
