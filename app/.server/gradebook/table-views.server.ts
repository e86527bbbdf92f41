// Each person's remembered view of a table (which columns show, the sort, the filters, the search),
// kept per table key such as "session-gradebook" so it follows them from one practical to the next.
import { QueryTypes } from "sequelize";
import { z } from "zod";
import { getSequelize } from "../db/sequelize.server";

export const TABLE_KEYS = ["session-gradebook", "course-gradebook"] as const;
export type TableKey = (typeof TABLE_KEYS)[number];

const columnId = z.string().min(1).max(80);
export const tableViewSchema = z.object({
  hidden: z.array(columnId).max(200).default([]),
  sort: z.array(z.object({ id: columnId, desc: z.boolean() })).max(5).default([]),
  filters: z.array(z.object({ id: columnId, value: z.string().max(200) })).max(50).default([]),
  search: z.string().max(200).default(""),
});
export type TableView = z.infer<typeof tableViewSchema>;

export const EMPTY_VIEW: TableView = { hidden: [], sort: [], filters: [], search: "" };

export function isTableKey(raw: string | undefined): raw is TableKey {
  return (TABLE_KEYS as readonly string[]).includes(raw ?? "");
}

export async function tableView(userId: number, key: TableKey): Promise<TableView> {
  const [row] = await getSequelize().query<{ settings: unknown }>(
    "select settings from table_views where user_id = $1 and table_key = $2",
    { bind: [userId, key], type: QueryTypes.SELECT },
  );
  const parsed = tableViewSchema.safeParse(row?.settings ?? {});
  return parsed.success ? parsed.data : EMPTY_VIEW;
}

export async function saveTableView(userId: number, key: TableKey, view: TableView): Promise<void> {
  await getSequelize().query(
    `insert into table_views (user_id, table_key, settings, updated_at) values ($1, $2, $3::jsonb, now())
     on conflict (user_id, table_key) do update set settings = excluded.settings, updated_at = excluded.updated_at`,
    { bind: [userId, key, JSON.stringify(view)] },
  );
}
