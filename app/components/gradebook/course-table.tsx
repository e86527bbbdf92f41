// A course's gradebook: a row per student with each practical's mark, the weighted total and
// how many due practicals have no mark. Missing work shows as missing, never as a zero mark;
// when the course counts it as zero in the total, the cell says so.
import { useMemo } from "react";
import type { CourseGradebookSession } from "~/.server/gradebook/course.server";
import type { CoursePageRow } from "~/.server/gradebook/pages.server";
import { sig } from "~/lib/format";
import type { SavedTableView } from "~/lib/gradebook/table-view";
import { DataTable, type GradeColumn } from "./data-table";
import { Missing, percentText } from "./cells";

type Row = CoursePageRow;

function practicalColumn(s: CourseGradebookSession, zero: boolean): GradeColumn<Row> {
  const key = String(s.id);
  const missingText = zero && s.weight > 0 ? "missing, counted as 0 in the total" : "missing";
  const absent = s.due ? missingText : "not yet due";
  return {
    id: `s-${s.id}`,
    label: s.title,
    unit: `(%) · ${s.date} · weight ${sig(s.weight, 3)}`,
    width: "w-36",
    numeric: true,
    value: (r) => r.marks[key] ?? null,
    text: (r) => { const m = r.marks[key]; return m === null || m === undefined ? absent : percentText(m); },
    cell: (r) => {
      const m = r.marks[key];
      if (m !== null && m !== undefined) return percentText(m);
      if (!s.due) return <span className="text-sm text-ink-soft">not yet due</span>;
      return <Missing reason={missingText} note={zero && s.weight > 0 ? "(0 in total)" : undefined} />;
    },
  };
}

function courseColumns(sessions: CourseGradebookSession[], zero: boolean): Array<GradeColumn<Row>> {
  return [
    {
      id: "name", label: "Name", width: "w-40 sm:w-56", hideable: false,
      text: (r) => r.name,
      cell: (r) => <span className="block truncate font-bold" title={r.name}>{r.name}</span>,
    },
    { id: "studentId", label: "Student ID", width: "w-28", text: (r) => r.studentId ?? "", cell: (r) => r.studentId ?? <Missing reason="no student ID on the roster" /> },
    { id: "group", label: "Group", width: "w-24", text: (r) => r.group ?? "", cell: (r) => r.group ?? <Missing reason="in no group" /> },
    ...sessions.map((s) => practicalColumn(s, zero)),
    {
      id: "total", label: "Total", unit: "(%, weighted)", width: "w-28", numeric: true, pin: "end",
      value: (r) => r.total,
      text: (r) => (r.total === null ? "no total yet" : percentText(r.total)),
      cell: (r) => (r.total === null ? <Missing reason="no total yet" /> : <span className="font-bold">{percentText(r.total)}</span>),
    },
    {
      id: "missing", label: "Missing", unit: "(practicals)", width: "w-24", numeric: true,
      value: (r) => r.missing,
      text: (r) => String(r.missing),
      cell: (r) => (r.missing ? <span className="font-bold text-bad">{r.missing}</span> : "0"),
    },
  ];
}

export function CourseGradebookTable({ sessions, missingCountsAsZero, rows, initialView }: { sessions: CourseGradebookSession[]; missingCountsAsZero: boolean; rows: Row[]; initialView: SavedTableView }) {
  const columns = useMemo(() => courseColumns(sessions, missingCountsAsZero), [sessions, missingCountsAsZero]);
  return (
    <DataTable
      tableKey="course-gradebook"
      label="Gradebook of this course"
      rows={rows}
      columns={columns}
      rowId={rowId}
      searchText={searchText}
      searchLabel="Search names, student IDs, groups"
      noun={["student", "students"]}
      initialView={initialView}
      rowHeight={33}
    />
  );
}

const rowId = (r: Row) => String(r.id);
const searchText = (r: Row) => `${r.name} ${r.studentId ?? ""} ${r.group ?? ""}`;
