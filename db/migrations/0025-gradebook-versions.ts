// A version number per course, raised by the database whenever anything a gradebook shows changes
// (marks, benches, practicals, people, groups, names, the reference). The app keeps a built
// gradebook while its course's version stands still, so a read is two small queries, not a
// rebuild. The triggers are deferred constraint triggers: they run at commit, after every other
// lock the transaction takes, so raising the counter cannot deadlock with row locks taken earlier
// (an upload locks its group row, a roster import touches groups through foreign keys).
import type { QueryInterface } from "sequelize";

// table -> the events that matter to a gradebook (a person: only a new name or e-mail)
const TABLES: Record<string, string> = {
  courses: "insert or update or delete",
  lab_sessions: "insert or update or delete",
  benches: "insert or update or delete",
  submissions: "insert or update or delete",
  course_memberships: "insert or update or delete",
  group_members: "insert or update or delete",
  groups: "insert or update or delete",
  reaction_systems: "insert or update or delete",
  users: "update of display_name, email",
};

export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`create table gradebook_versions (course_id integer primary key, version bigint not null default 0)`);
  await sql(`
    create function gradebook_bump(cid integer) returns void language sql as $$
      insert into gradebook_versions (course_id, version)
      select cid, 1 where exists (select 1 from courses where id = cid)
      on conflict (course_id) do update set version = gradebook_versions.version + 1
    $$`);
  // The courses a changed row belongs to, per table; fields are read only in their table's branch.
  await sql(`
    create function gradebook_touch() returns trigger language plpgsql as $$
    begin
      if TG_TABLE_NAME = 'courses' then
        if TG_OP <> 'DELETE' then perform gradebook_bump(NEW.id); end if;
        if TG_OP <> 'INSERT' then perform gradebook_bump(OLD.id); end if;
      elsif TG_TABLE_NAME in ('submissions', 'benches') then
        if TG_OP <> 'DELETE' then perform gradebook_bump(ls.course_id) from lab_sessions ls where ls.id = NEW.session_id; end if;
        if TG_OP <> 'INSERT' then perform gradebook_bump(ls.course_id) from lab_sessions ls where ls.id = OLD.session_id; end if;
      elsif TG_TABLE_NAME = 'users' then
        perform gradebook_bump(cm.course_id) from course_memberships cm where cm.user_id = NEW.id;
      else
        if TG_OP <> 'DELETE' then perform gradebook_bump(NEW.course_id); end if;
        if TG_OP <> 'INSERT' then perform gradebook_bump(OLD.course_id); end if;
      end if;
      return null;
    end $$`);
  for (const [t, events] of Object.entries(TABLES)) {
    await sql(`create constraint trigger ${t}_gradebook_version after ${events} on ${t} deferrable initially deferred for each row execute function gradebook_touch()`);
  }
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  for (const t of Object.keys(TABLES)) await sql(`drop trigger if exists ${t}_gradebook_version on ${t}`);
  await sql("drop function if exists gradebook_touch()");
  await sql("drop function if exists gradebook_bump(integer)");
  await sql("drop table if exists gradebook_versions");
}
