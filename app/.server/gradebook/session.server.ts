// A practical's gradebook: a row per group at a bench, from the version that counts (the one a
// reviewer chose, else the latest marked one; counting.server.ts). One SQL statement: the page, the API, the exports and the
// class results all read it, and the course gradebook has to answer hundreds of times a second,
// so it reads only the few fields it shows out of the JSONB columns.
import { feedRatio, nuOf } from "~/lib/planning/feed-ratio";
import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import { LabSession } from "../db/lab-sessions.server";
import { ReactionSystem } from "../db/reaction-systems.server";
import { Course } from "../db/models.server";
import { rateConstantAt } from "~/lib/kinetics/arrhenius";
import { cached, sessionCourseVersion } from "./cache.server";
import { countingOrder } from "./counting.server";

export interface SessionGradebookRow {
  groupId: number;
  group: string;
  members: string[];
  benchId: number;
  bench: string;
  CA0: number;
  CB0: number;
  /** CB0 / CA0 */
  feedRatio: number;
  temperatureC: number;
  submissionId: number | null;
  version: number | null;
  status: "queued" | "marked" | "refused" | "failed" | null;
  submittedAt: string | null;
  /** marking k, per second (mol/L), with its standard error and 95 % interval */
  k: number | null;
  kStdErr: number | null;
  kCI95: [number, number] | null;
  /** the reference k at the bench's temperature (Arrhenius from the reaction system) */
  kRefAtT: number;
  deviationPct: number | null;
  /** percent of the practical's marks from each check, after weights, before the late penalty */
  experimentPart: number | null;
  analysisPart: number | null;
  latePenalty: number | null;
  late: boolean;
  overridden: boolean;
  overrideReason: string | null;
  /** 0-100: the override when there is one, else the automatic mark of a marked version */
  mark: number | null;
  flags: string[];
  reviewState: "to-check" | "checked" | null;
}

export interface SessionGradebook {
  session: {
    id: number; courseId: number; courseCode: string; title: string; date: string; status: string;
    deadline: string | null; marksReleasedAt: string | null; gradeWeight: number;
  };
  /** orders in A and B: k is per second (1/s) when they add up to 1, else L/(mol·s) */
  /** kUnit: k's unit, from the rate law's overall order (k defined on A) */
  reaction: { name: string; kRef: number; TrefC: number; EaKJ: number; measured: string; orderA: number; orderB: number; kUnit: "1/s" | "L/(mol·s)" };
  rows: SessionGradebookRow[];
}

const ROWS = `
select b.id as bench_id, b.label as bench, b.ca0, b.cb0, b.temperature_c, b.position,
       g.id as group_id, g.name as group_name,
       coalesce((select array_agg(u.display_name order by u.display_name) from group_members gm join users u on u.id = gm.user_id where gm.group_id = g.id), '{}') as members,
       s.id as submission_id, s.version, s.status, s.submitted_at, s.late, s.auto_mark, s.override_mark, s.override_reason,
       s.experiment_part, s.analysis_part, s.late_penalty, s.review_state,
       (s.checks->>'kMarking')::float8 as k_marking,
       (s.checks->'experiment'->>'deviationPct')::float8 as deviation_pct,
       (s.fit->>'kStdErr')::float8 as k_std_err,
       (s.fit->'kCI95'->>0)::float8 as k_lo, (s.fit->'kCI95'->>1)::float8 as k_hi,
       coalesce((select jsonb_agg(f->'code') from jsonb_array_elements(s.flags) f), '[]'::jsonb) as flag_codes
  from benches b
  join groups g on g.id = b.group_id
  left join lateral (
    select * from submissions x where x.session_id = b.session_id and x.group_id = b.group_id order by ${countingOrder("x")} limit 1
  ) s on true
 where b.session_id = $1
 order by b.position`;

const celsius = (t: number) => t + 273.15;

export function markOf(status: string | null, autoMark: number | null, overrideMark: number | null): number | null {
  if (overrideMark !== null && overrideMark !== undefined) return overrideMark;
  return status === "marked" ? autoMark ?? null : null;
}

/** The practical's gradebook (kept while nothing in its course changes), or null when there is no such practical. Staff only: the caller checks. */
export async function sessionGradebook(sessionId: number, knownVersion?: string): Promise<SessionGradebook | null> {
  const version = knownVersion ?? (await sessionCourseVersion(sessionId));
  if (version === null) return null;
  return cached(`session:${sessionId}`, version, async () => ({ value: await buildSessionGradebook(sessionId), validUntil: Infinity }));
}

export async function buildSessionGradebook(sessionId: number): Promise<SessionGradebook | null> {
  const session = await LabSession.findByPk(sessionId, {
    include: [{ model: ReactionSystem, as: "reactionSystem" }, { model: Course, as: "course" }],
  });
  if (!session) return null;
  const system = session.reactionSystem!;
  const course = (session as unknown as { course: Course }).course;
  const raw = await getSequelize().query<Record<string, any>>(ROWS, { bind: [sessionId], type: QueryTypes.SELECT });
  const nu = nuOf(system);
  const kRefAt = (T: number) => rateConstantAt(system.kRef, celsius(system.TrefC), system.EaKJ * 1000, celsius(T));
  const rows = raw.map((r): SessionGradebookRow => ({
    groupId: r.group_id,
    group: r.group_name,
    members: r.members,
    benchId: r.bench_id,
    bench: r.bench,
    CA0: r.ca0,
    CB0: r.cb0,
    feedRatio: feedRatio(r.ca0, r.cb0, nu),
    temperatureC: r.temperature_c,
    submissionId: r.submission_id ?? null,
    version: r.version ?? null,
    status: r.status ?? null,
    submittedAt: r.submitted_at ? new Date(r.submitted_at).toISOString() : null,
    k: r.k_marking ?? null,
    kStdErr: r.k_std_err ?? null,
    kCI95: r.k_lo !== null && r.k_hi !== null ? [r.k_lo, r.k_hi] : null,
    kRefAtT: kRefAt(r.temperature_c),
    deviationPct: r.deviation_pct ?? null,
    experimentPart: r.experiment_part ?? null,
    analysisPart: r.analysis_part ?? null,
    latePenalty: r.late_penalty ?? null,
    late: r.late ?? false,
    overridden: r.override_mark !== null && r.override_mark !== undefined,
    overrideReason: r.override_reason ?? null,
    mark: markOf(r.status ?? null, r.auto_mark ?? null, r.override_mark ?? null),
    flags: r.flag_codes ?? [],
    reviewState: r.review_state ?? null,
  }));
  return {
    session: {
      id: session.id, courseId: session.courseId, courseCode: course.code, title: session.title, date: session.date,
      status: session.status, deadline: session.deadline?.toISOString() ?? null,
      marksReleasedAt: session.marksReleasedAt?.toISOString() ?? null, gradeWeight: session.gradeWeight,
    },
    reaction: { name: system.name, kRef: system.kRef, TrefC: system.TrefC, EaKJ: system.EaKJ, measured: system.measured, orderA: system.orderA, orderB: system.orderB,
      kUnit: system.orderA + system.orderB === 1 ? "1/s" : "L/(mol·s)" },
    rows,
  };
}
