// The gradebooks' table: sorting by a column, a filter box per column, a search box, a choice of
// columns, and the person's view of it remembered on the server; rows virtualised (only those in
// view and a few around them are in the page), so 600 rows scroll smoothly; sticky header; the
// name pinned left and the deciding column (mark, total) pinned right.
//
// Server-rendered with its first rows: the virtualiser starts from `initialRect` until it can
// measure its box. No style attribute is ever rendered (the CSP has no 'unsafe-inline' for
// styles): the two spacer rows that stand for the rows out of view get their heights through the
// DOM (element.style, CSSOM), which the CSP does not govern, once the page runs in the browser.
import { useEffect, useLayoutEffect, useMemo, useRef, useState, type ReactNode } from "react";
import { useFetcher } from "react-router";
import {
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type ColumnFiltersState,
  type SortingState,
  type VisibilityState,
} from "@tanstack/react-table";
import { useVirtualizer } from "@tanstack/react-virtual";
import { TableBox } from "~/components/page";
import { cellPasses } from "~/lib/gradebook/table-filter";
import type { SavedTableView } from "~/lib/gradebook/table-view";

export interface GradeColumn<Row> {
  id: string;
  /** the header's words; also names the column in the filter box and the column choice */
  label: string;
  /** shown under the label, e.g. "(mol/L)" */
  unit?: string;
  /** Tailwind width of the cell's box ("w-28"): fixed, so columns keep their width while rows scroll in */
  width: string;
  numeric?: boolean;
  /** the number behind the cell, for sorting and number filters; null when there is none (missing) */
  value?: (row: Row) => number | null;
  /** the cell in words: text filters, search, and sorting of columns without a number */
  text: (row: Row) => string;
  /** the cell as drawn (default: its text) */
  cell?: (row: Row) => ReactNode;
  /** "yes-no": the filter is a choice of yes / no, on value 1 / 0 */
  filter?: "text" | "yes-no";
  /** false: always shown (the column that names the row) */
  hideable?: boolean;
  /**
   * "end": the column that decides (the mark) is drawn last and pinned to the box's right edge, so
   * it is in view beside the pinned name at any width without scrolling sideways; always shown.
   */
  pin?: "end";
}

interface Props<Row> {
  tableKey: "session-gradebook" | "course-gradebook";
  /** the scrolling box's accessible name */
  label: string;
  rows: Row[];
  columns: Array<GradeColumn<Row>>;
  rowId: (row: Row) => string;
  /** words searched by the search box */
  searchText: (row: Row) => string;
  searchLabel: string;
  /** "group" -> "3 of 8 groups" */
  noun: [singular: string, plural: string];
  initialView: SavedTableView;
  /** a first guess of a row's height in px (rows are measured once drawn) */
  rowHeight?: number;
}

const SAVE_DELAY_MS = 400;

function toColumnDef<Row>(c: GradeColumn<Row>): ColumnDef<Row, unknown> {
  return {
    id: c.id,
    header: c.label,
    accessorFn: (row) => (c.value ? c.value(row) ?? undefined : c.text(row) || undefined),
    cell: (ctx) => (c.cell ? c.cell(ctx.row.original) : c.text(ctx.row.original)),
    sortingFn: c.value ? "basic" : "alphanumeric",
    sortUndefined: "last",
    sortDescFirst: false,
    enableHiding: c.hideable !== false && c.pin !== "end",
    filterFn: (row, _id, filterValue: string) => {
      if (c.filter === "yes-no") return filterValue === "" || (c.value?.(row.original) === 1) === (filterValue === "yes");
      const text = c.text(row.original);
      const value = c.value ? c.value(row.original) : text === "" ? null : NaN;
      return cellPasses(filterValue, value, text);
    },
  };
}

function sortMark(dir: false | "asc" | "desc") {
  return dir === "asc" ? "▲" : dir === "desc" ? "▼" : "↕";
}

export function DataTable<Row>({ tableKey, label, rows, columns, rowId, searchText, searchLabel, noun, initialView, rowHeight = 37 }: Props<Row>) {
  const ids = useMemo(() => new Set(columns.map((c) => c.id)), [columns]);
  const metaOf = useMemo(() => new Map(columns.map((c) => [c.id, c])), [columns]);
  const defs = useMemo(() => [...columns.filter((c) => c.pin !== "end"), ...columns.filter((c) => c.pin === "end")].map(toColumnDef), [columns]);

  const [sorting, setSorting] = useState<SortingState>(() => initialView.sort.filter((s) => ids.has(s.id)).slice(0, 1));
  const [columnFilters, setColumnFilters] = useState<ColumnFiltersState>(() => initialView.filters.filter((f) => ids.has(f.id) && f.value !== ""));
  const [columnVisibility, setColumnVisibility] = useState<VisibilityState>(() =>
    Object.fromEntries(initialView.hidden.filter((id) => ids.has(id) && metaOf.get(id)?.hideable !== false).map((id) => [id, false])),
  );
  const [search, setSearch] = useState(initialView.search);

  // Search over each row's words, lower-cased once.
  const haystack = useMemo(() => rows.map((r) => searchText(r).toLowerCase()), [rows, searchText]);
  const searched = useMemo(() => {
    const needle = search.trim().toLowerCase();
    return needle ? rows.filter((_, i) => haystack[i].includes(needle)) : rows;
  }, [rows, haystack, search]);

  const table = useReactTable({
    data: searched,
    columns: defs,
    state: { sorting, columnFilters, columnVisibility },
    onSortingChange: setSorting,
    onColumnFiltersChange: setColumnFilters,
    onColumnVisibilityChange: setColumnVisibility,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getRowId: (row) => rowId(row),
    enableMultiSort: false,
  });

  // Remember the view: every change after the first render is sent (a little later, so typing
  // in a filter sends one request). Column ids of other courses' tables are kept as they were.
  const fetcher = useFetcher<{ view?: SavedTableView; errors?: Array<{ message: string }>; error?: string }>();
  const hidden = Object.entries(columnVisibility).filter(([, shown]) => !shown).map(([id]) => id);
  const view: SavedTableView = {
    hidden: [...initialView.hidden.filter((id) => !ids.has(id)), ...hidden].slice(-200),
    sort: sorting.map((s) => ({ id: s.id, desc: s.desc })),
    filters: columnFilters.map((f) => ({ id: f.id, value: String(f.value ?? "") })).filter((f) => f.value !== ""),
    search,
  };
  const viewJson = JSON.stringify(view);
  const lastSent = useRef<string | null>(null);
  const submit = fetcher.submit;
  useEffect(() => {
    // The first run only notes the view the page opened with.
    if (lastSent.current === null) lastSent.current = viewJson;
    if (viewJson === lastSent.current) return;
    const timer = setTimeout(() => {
      lastSent.current = viewJson;
      void submit(JSON.parse(viewJson), { method: "post", action: `/api/table-views/${tableKey}`, encType: "application/json" });
    }, SAVE_DELAY_MS);
    return () => clearTimeout(timer);
  }, [viewJson, submit, tableKey]);
  const saveProblem = fetcher.data?.error ?? fetcher.data?.errors?.map((e) => e.message).join(" ");

  const shown = table.getRowModel().rows;
  const boxRef = useRef<HTMLDivElement>(null);
  const virtualizer = useVirtualizer({
    count: shown.length,
    getScrollElement: () => boxRef.current,
    estimateSize: () => rowHeight,
    overscan: 12,
    // What the server (and the first render in the browser) assumes before the box is measured.
    initialRect: { width: 1280, height: 640 },
    getItemKey: (i) => shown[i]?.id ?? i,
  });
  const items = virtualizer.getVirtualItems();
  const padTop = items.length ? items[0].start : 0;
  const padBottom = items.length ? virtualizer.getTotalSize() - items[items.length - 1].end : 0;
  const topSpacer = useRef<HTMLTableCellElement>(null);
  const bottomSpacer = useRef<HTMLTableCellElement>(null);
  const wrapper = useRef<HTMLDivElement>(null);
  useEffect(() => {
    // Marks the table as live (tests wait for it; before this, sorting buttons do nothing).
    if (wrapper.current) wrapper.current.dataset.hydrated = "true";
  }, []);
  useLayoutEffect(() => {
    if (topSpacer.current) topSpacer.current.style.height = `${padTop}px`;
    if (bottomSpacer.current) bottomSpacer.current.style.height = `${padBottom}px`;
  }, [padTop, padBottom]);

  const visibleColumns = table.getVisibleLeafColumns();
  const hideable = table.getAllLeafColumns().filter((c) => c.getCanHide());
  const filtering = columnFilters.length > 0 || search.trim() !== "";
  const countText = `${shown.length === rows.length ? `All ${rows.length}` : `${shown.length} of ${rows.length}`} ${rows.length === 1 ? noun[0] : noun[1]}`;

  return (
    <div ref={wrapper} data-table={tableKey}>
      <div className="mb-3 flex flex-wrap items-end gap-x-6 gap-y-3">
        <label className="block">
          <span className="block font-bold">{searchLabel}</span>
          <input type="search" value={search} onChange={(e) => setSearch(e.target.value)} className="mt-1 w-72 max-w-full rounded border border-ink-soft bg-white px-3 py-1.5" />
        </label>
        <details className="rounded border border-rule bg-white px-3 py-1.5">
          <summary className="cursor-pointer font-bold">Columns{hidden.length ? ` (${hidden.length} hidden)` : ""}</summary>
          <fieldset className="mt-2 grid gap-x-6 sm:grid-cols-2 lg:grid-cols-3">
            <legend className="sr-only">Columns shown</legend>
            {hideable.map((c) => (
              <label key={c.id} className="flex items-center gap-2 py-0.5">
                <input type="checkbox" checked={c.getIsVisible()} onChange={c.getToggleVisibilityHandler()} />
                {metaOf.get(c.id)?.label}
                {metaOf.get(c.id)?.unit ? ` ${metaOf.get(c.id)?.unit}` : ""}
              </label>
            ))}
          </fieldset>
        </details>
        {filtering ? (
          <button type="button" className="rounded border border-ink-soft px-3 py-1.5 hover:bg-accent-soft" onClick={() => { setSearch(""); setColumnFilters([]); }}>
            Clear search and filters
          </button>
        ) : null}
      </div>
      <p className="mb-2 text-sm text-ink-soft">
        Filter boxes take a comparison (<kbd>&gt; 60</kbd>, <kbd>&lt;= 0.5</kbd>), a range (<kbd>50 to 70</kbd>), <kbd>missing</kbd>, or any text in the column. Select a column's name to sort by it.
      </p>
      <p className="mb-2 font-bold" role="status" aria-live="polite">
        {countText}
        {saveProblem ? <span className="ml-3 font-normal text-bad">Your view of this table was not saved: {saveProblem}</span> : null}
      </p>
      <TableBox label={label} tall boxRef={boxRef}>
        <table className="w-full border-separate border-spacing-0 text-left">
          <thead>
            <tr>
              {table.getHeaderGroups()[0].headers.map((header, i) => {
                const meta = metaOf.get(header.column.id)!;
                const dir = header.column.getIsSorted();
                const filterValue = String(header.column.getFilterValue() ?? "");
                return (
                  <th
                    key={header.id}
                    scope="col"
                    aria-sort={dir === "asc" ? "ascending" : dir === "desc" ? "descending" : "none"}
                    className={`sticky top-0 bg-white px-2 pt-2 pb-1.5 align-bottom ${meta.pin === "end" ? "right-0 z-30 shadow-[inset_2px_0_0_var(--color-rule),inset_0_-2px_0_var(--color-ink)]" : `shadow-[inset_0_-2px_0_var(--color-ink)] ${i === 0 ? "left-0 z-30" : "z-20"}`}`}
                  >
                    <div className={meta.width}>
                      <button type="button" onClick={header.column.getToggleSortingHandler()} className={`flex w-full items-end gap-1 font-bold hover:text-accent ${meta.numeric ? "justify-end text-right" : "text-left"}`}>
                        <span className="min-w-0">
                          <span className="line-clamp-3" title={meta.label}>{meta.label}</span>
                          {meta.unit ? <> <span className="block text-sm font-normal">{meta.unit}</span></> : null}
                        </span>
                        <span aria-hidden="true" className={dir ? "text-accent" : "text-ink-soft"}>{sortMark(dir)}</span>
                      </button>
                      {meta.filter === "yes-no" ? (
                        <select aria-label={`Filter ${meta.label}`} value={filterValue} onChange={(e) => header.column.setFilterValue(e.target.value || undefined)} className="mt-1 w-full rounded border border-ink-soft bg-white px-1 py-0.5 text-sm font-normal">
                          <option value="">all</option>
                          <option value="yes">yes</option>
                          <option value="no">no</option>
                        </select>
                      ) : (
                        <input aria-label={`Filter ${meta.label}`} value={filterValue} onChange={(e) => header.column.setFilterValue(e.target.value || undefined)} className="mt-1 w-full rounded border border-ink-soft bg-white px-1 py-0.5 text-sm font-normal" />
                      )}
                    </div>
                  </th>
                );
              })}
            </tr>
          </thead>
          <tbody>
            <tr aria-hidden="true">
              <td ref={topSpacer} colSpan={visibleColumns.length} className="p-0" />
            </tr>
            {items.map((item) => {
              const row = shown[item.index];
              return (
                <tr key={row.id} data-index={item.index} ref={virtualizer.measureElement} className="group">
                  {row.getVisibleCells().map((cell, i) => {
                    const meta = metaOf.get(cell.column.id)!;
                    return (
                      <td key={cell.id} className={`border-b border-rule px-2 py-1 align-top group-hover:bg-accent-soft ${meta.pin === "end" ? "sticky right-0 z-10 bg-white shadow-[inset_2px_0_0_var(--color-rule)]" : i === 0 ? "sticky left-0 z-10 bg-white" : ""}`}>
                        <div className={`${meta.width}${meta.numeric ? " num" : ""}`}>{flexRender(cell.column.columnDef.cell, cell.getContext())}</div>
                      </td>
                    );
                  })}
                </tr>
              );
            })}
            {shown.length === 0 ? (
              <tr>
                <td colSpan={visibleColumns.length} className="px-3 py-6 text-ink-soft">No {noun[1]} match the search and filters.</td>
              </tr>
            ) : null}
            <tr aria-hidden="true">
              <td ref={bottomSpacer} colSpan={visibleColumns.length} className="p-0" />
            </tr>
          </tbody>
        </table>
      </TableBox>
    </div>
  );
}
