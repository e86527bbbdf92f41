// The dashboard's live figures: for each practical open for uploads in the caller's courses, how
// many groups have uploaded, how many versions arrived, and the latest versions being marked,
// marked and flagged (flagged as the review queue sorts them, queueTabOf). Two SQL statements
// whatever the number of practicals, since the dashboard asks every few seconds.
import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import type { User } from "../db/models.server";
import { queueTabOf } from "../submissions/review.server";
import type { LiveFigures, LivePractical } from "~/lib/dashboard/live-figures";

/**
 * Open for uploads: planned or notified. A draft has not been given to the groups, and a closed
 * practical is over; uploads after the deadline are still taken (marked late), so the deadline
 * does not close it.
 */
export const OPEN_FOR_UPLOADS = ["planned", "notified"] as const;

/** At most this many practicals are shown, nearest lab day first. */
const LIMIT = 30;

const PRACTICALS = `
select s.id, s.title, s.date, s.status, c.id as course_id, c.code as course_code,
       (select count(*) from benches b where b.session_id = s.id and b.group_id is not null)::int as groups,
       (select count(*) from submissions x where x.session_id = s.id)::int as versions,
       (select max(x.submitted_at) from submissions x where x.session_id = s.id) as last_upload_at
  from lab_sessions s
  join courses c on c.id = s.course_id
 where s.status in (:open) and c.archived_at is null
   and (:everyCourse or exists (
         select 1 from course_memberships m
          where m.course_id = c.id and m.user_id = :userId and m.role in ('instructor', 'demonstrator')))
 order by abs(s.date - current_date), s.date, s.id
 limit ${LIMIT}`;

// Each group at a bench with its latest version (as the review queue counts them).
const LATEST = `
select distinct on (x.session_id, x.group_id) x.session_id, x.status, x.review_state, x.flags
  from submissions x
  join benches b on b.session_id = x.session_id and b.group_id = x.group_id
 where x.session_id in (:ids)
 order by x.session_id, x.group_id, x.version desc`;

/** The open practicals of the caller's courses as staff (every course for an admin), with their figures. */
export async function liveFigures(user: User): Promise<LiveFigures> {
  const sequelize = getSequelize();
  const rows = await sequelize.query<Record<string, any>>(PRACTICALS, {
    replacements: { open: [...OPEN_FOR_UPLOADS], everyCourse: user.role === "admin", userId: user.id },
    type: QueryTypes.SELECT,
  });
  const practicals: LivePractical[] = rows.map((r) => ({
    id: r.id, title: r.title, date: r.date, status: r.status, courseId: r.course_id, courseCode: r.course_code,
    groups: r.groups, uploaded: 0, versions: r.versions, beingMarked: 0, marked: 0, flagged: 0,
    lastUploadAt: r.last_upload_at ? new Date(r.last_upload_at).toISOString() : null,
  }));
  if (practicals.length) {
    const byId = new Map(practicals.map((p) => [p.id, p]));
    const latest = await sequelize.query<{ session_id: number; status: string; review_state: string; flags: Array<{ code: string }> }>(LATEST, {
      replacements: { ids: practicals.map((p) => p.id) },
      type: QueryTypes.SELECT,
    });
    for (const s of latest) {
      const p = byId.get(s.session_id)!;
      p.uploaded++;
      if (s.status === "queued") p.beingMarked++;
      if (s.status === "marked") p.marked++;
      if (queueTabOf({ status: s.status as never, reviewState: s.review_state as never, flags: s.flags as never }) === "flagged") p.flagged++;
    }
  }
  return { at: new Date().toISOString(), practicals };
}
