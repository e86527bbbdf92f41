// A practical's gradebook: a row per group at a bench, from the group's latest version.
import { FEED_RATIO_HEADER } from "~/lib/planning/feed-ratio";
import { useMemo } from "react";
import { Link } from "react-router";
import type { SessionGradebookRow } from "~/.server/gradebook/session.server";
import { sig, withInterval } from "~/lib/format";
import { flagTitle } from "~/lib/marking/flag-titles";
import type { SavedTableView } from "~/lib/gradebook/table-view";
import { DataTable, type GradeColumn } from "./data-table";
import { KWithInterval, Missing, percentText, signedPercentText } from "./cells";

type Row = SessionGradebookRow;

const STATUS_TEXT: Record<string, string> = { queued: "◌ being marked", marked: "✓ marked", refused: "✕ refused", failed: "✕ marking failed" };

/** Why a row has no mark, in words. */
function noMarkReason(r: Row): string {
  if (r.status === null) return "no upload";
  if (r.status === "queued") return "being marked";
  if (r.status === "refused") return "upload refused";
  if (r.status === "failed") return "marking failed";
  return "no mark";
}

function statusText(r: Row): string {
  if (r.status === null) return "no upload";
  const state = r.reviewState === "checked" ? " · checked" : r.reviewState === "to-check" ? " · to check" : "";
  return `${STATUS_TEXT[r.status] ?? r.status}${r.version && r.version > 1 ? ` (version ${r.version})` : ""}${state}`;
}

function numberColumn(id: string, label: string, unit: string, width: string, value: (r: Row) => number | null, show: (x: number) => string, missing: (r: Row) => string = noMarkReason): GradeColumn<Row> {
  return {
    id, label, unit, width, numeric: true, value,
    text: (r) => { const v = value(r); return v === null ? missing(r) : show(v); },
    cell: (r) => { const v = value(r); return v === null ? <Missing reason={missing(r)} /> : show(v); },
  };
}

function sessionColumns(sessionId: number, kUnit: string): Array<GradeColumn<Row>> {
  return [
    {
      id: "group", label: "Group", width: "w-28", hideable: false,
      text: (r) => r.group,
      cell: (r) => r.submissionId !== null
        ? <Link className="font-bold text-accent underline" to={`/sessions/${sessionId}/review/${r.submissionId}`}>{r.group}<span className="sr-only"> (review)</span></Link>
        : <span className="font-bold">{r.group}</span>,
    },
    { id: "bench", label: "Bench", width: "w-16", text: (r) => r.bench },
    { id: "members", label: "Members", width: "w-56", text: (r) => r.members.join(", ") || "nobody", cell: (r) => <span className="text-sm">{r.members.join(", ") || <Missing reason="nobody in this group" />}</span> },
    numberColumn("CA0", "CA0", "(mol/L)", "w-20", (r) => r.CA0, (x) => sig(x, 4)),
    numberColumn("CB0", "CB0", "(mol/L)", "w-20", (r) => r.CB0, (x) => sig(x, 4)),
    numberColumn("feedRatio", "Feed ratio", `(${FEED_RATIO_HEADER})`, "w-20", (r) => r.feedRatio, (x) => sig(x, 3)),
    numberColumn("temperatureC", "T", "(°C)", "w-16", (r) => r.temperatureC, (x) => sig(x, 3)),
    {
      id: "k", label: "Marking k", unit: `(${kUnit}), 95 % CI`, width: "w-60", numeric: true,
      value: (r) => r.k,
      text: (r) => (r.k === null ? noMarkReason(r) : withInterval(r.k, r.kCI95, 3)),
      cell: (r) => (r.k === null ? <Missing reason={noMarkReason(r)} /> : <KWithInterval k={r.k} ci={r.kCI95} />),
    },
    numberColumn("kRefAtT", "kRef at T", `(${kUnit})`, "w-28", (r) => r.kRefAtT, (x) => sig(x, 3, true)),
    numberColumn("deviationPct", "Deviation", "(% from kRef)", "w-28", (r) => r.deviationPct, signedPercentText),
    numberColumn("experimentPart", "Experiment", "(% of marks)", "w-28", (r) => r.experimentPart, percentText),
    numberColumn("analysisPart", "Analysis", "(% of marks)", "w-28", (r) => r.analysisPart, percentText),
    {
      id: "late", label: "Late", width: "w-32", filter: "yes-no",
      value: (r) => (r.late ? 1 : 0),
      text: (r) => (r.late ? `late${r.latePenalty ? `, −${sig(r.latePenalty, 3)} %` : ""}` : "on time"),
      cell: (r) => (r.late ? <span className="font-bold text-warn">late{r.latePenalty ? <span className="block text-sm font-normal">−{sig(r.latePenalty, 3)} % of marks</span> : null}</span> : r.status === null ? <Missing reason="no upload" /> : "on time"),
    },
    {
      id: "overridden", label: "Set by hand", width: "w-44", filter: "yes-no",
      value: (r) => (r.overridden ? 1 : 0),
      text: (r) => (r.overridden ? `set by hand: ${r.overrideReason ?? ""}` : "no"),
      cell: (r) => r.overridden ? (
        <span>
          <span className="font-bold">✎ set by hand</span>
          {r.overrideReason ? <span className="block truncate text-sm text-ink-soft" title={r.overrideReason}>{r.overrideReason}</span> : null}
        </span>
      ) : r.status === null ? <Missing reason="no upload" /> : "no",
    },
    {
      id: "mark", label: "Mark", unit: "(%)", width: "w-24", numeric: true, pin: "end",
      value: (r) => r.mark,
      text: (r) => (r.mark === null ? noMarkReason(r) : percentText(r.mark)),
      cell: (r) => (r.mark === null ? <span className="text-sm text-ink-soft">{noMarkReason(r)}</span> : <span className="font-bold">{percentText(r.mark)}</span>),
    },
    {
      id: "flags", label: "Flags", width: "w-56",
      text: (r) => (r.flags.length ? r.flags.map(flagTitle).join(", ") : r.status === null ? "" : "none"),
      cell: (r) => r.flags.length ? (
        <span className="flex flex-wrap gap-1">
          {r.flags.map((f) => <span key={f} className="rounded border border-warn px-1 text-sm text-warn"><span aria-hidden="true">⚠ </span>{flagTitle(f)}</span>)}
        </span>
      ) : r.status === null ? <Missing reason="no upload" /> : <span className="text-sm">none</span>,
    },
    { id: "status", label: "Status", width: "w-40", text: statusText, cell: (r) => <span className="text-sm">{statusText(r)}</span> },
  ];
}

export function SessionGradebookTable({ sessionId, kUnit, rows, initialView }: { sessionId: number; kUnit: string; rows: Row[]; initialView: SavedTableView }) {
  const columns = useMemo(() => sessionColumns(sessionId, kUnit), [sessionId, kUnit]);
  return (
    <DataTable
      tableKey="session-gradebook"
      label="Gradebook of this practical"
      rows={rows}
      columns={columns}
      rowId={rowId}
      searchText={searchText}
      searchLabel="Search groups, members, benches"
      noun={["group", "groups"]}
      initialView={initialView}
      rowHeight={58}
    />
  );
}

const rowId = (r: Row) => String(r.groupId);
const searchText = (r: Row) => `${r.group} ${r.bench} ${r.members.join(" ")}`;
