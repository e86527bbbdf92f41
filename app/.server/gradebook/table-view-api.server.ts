// The body of POST /api/table-views/:tableKey, checked: a known table, and a view in the shape
// of tableViewSchema with no unknown fields (a misspelt field is named, never ignored).
import { TABLE_KEYS, isTableKey, tableViewSchema, type TableKey, type TableView } from "./table-views.server";
import type { QueryProblem } from "./access.server";

const strictView = tableViewSchema.strict();

export function tableKeyOrProblem(raw: string | undefined): { key: TableKey } | { error: string } {
  if (isTableKey(raw)) return { key: raw };
  return { error: `There is no table "${raw ?? ""}"; the tables with remembered views are ${TABLE_KEYS.join(", ")}.` };
}

export function checkTableView(body: unknown): { ok: true; view: TableView } | { ok: false; errors: QueryProblem[] } {
  const parsed = strictView.safeParse(body);
  if (parsed.success) return { ok: true, view: parsed.data };
  return {
    ok: false,
    errors: parsed.error.issues.map((issue) => {
      const path = issue.path.map(String).join(".");
      const keys = issue.code === "unrecognized_keys" ? ` (${issue.keys.join(", ")})` : "";
      return { path, message: `${issue.message}${keys}` };
    }),
  };
}
