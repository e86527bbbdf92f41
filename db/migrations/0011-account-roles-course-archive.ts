// Account-level roles get names of their own, so they no longer read as course roles (what a
// person may do in a course follows their course role): admin, course-creator (may create
// courses; was "instructor"), member (everyone else; was "demonstrator" or "student").
// Courses can be archived, and a course code is unique within a term, not forever.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  const q = (sql: string) => qi.sequelize.query(sql);
  await q("alter table users drop constraint users_role_check");
  await q("update users set role = 'course-creator' where role = 'instructor'");
  await q("update users set role = 'member' where role in ('demonstrator', 'student')");
  await q("alter table users add constraint users_role_check check (role in ('admin','course-creator','member'))");

  await qi.addColumn("courses", "archived_at", { type: DataTypes.DATE, allowNull: true });
  await q("alter table courses drop constraint if exists courses_code_key");
  await qi.addIndex("courses", ["code", "term"], { unique: true, name: "courses_code_term_unique" });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const q = (sql: string) => qi.sequelize.query(sql);
  await qi.removeIndex("courses", "courses_code_term_unique");
  await q("alter table courses add constraint courses_code_key unique (code)");
  await qi.removeColumn("courses", "archived_at");
  await q("alter table users drop constraint users_role_check");
  await q("update users set role = 'instructor' where role = 'course-creator'");
  await q("update users set role = 'student' where role = 'member'");
  await q("alter table users add constraint users_role_check check (role in ('admin','instructor','demonstrator','student'))");
}
