// The version that counts in a gradebook: a reviewer may choose one of a group's versions in a
// practical (at most one per group and practical); without a choice it is the latest marked one.
import type { QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("alter table submissions add column counts_chosen boolean not null default false");
  await qi.sequelize.query("create unique index submissions_one_chosen_per_group on submissions (session_id, group_id) where counts_chosen");
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("drop index if exists submissions_one_chosen_per_group");
  await qi.sequelize.query("alter table submissions drop column if exists counts_chosen");
}
