// A person's remembered view of a table, as the pages and POST /api/table-views/:tableKey carry
// it (the server checks it with tableViewSchema in app/.server/gradebook/table-views.server.ts).
export interface SavedTableView {
  /** ids of hidden columns */
  hidden: string[];
  sort: Array<{ id: string; desc: boolean }>;
  /** each column's filter text (see table-filter.ts) */
  filters: Array<{ id: string; value: string }>;
  search: string;
}
