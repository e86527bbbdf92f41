// Built gradebooks kept in memory while their course's version (gradebook_versions, raised by the
// database at commit whenever anything a gradebook shows changes; migration 0025) stands still,
// and, for a course, until the next deadline passes (a deadline turns missing work into missing).
// The version is read before the data, so a change that commits in between makes the next read
// rebuild: a stale gradebook is never kept. Values are frozen, so no reader can change another's.
import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize.server";

interface Entry {
  version: string;
  validUntil: number;
  value: unknown;
  json?: string;
}

const MAX_ENTRIES = 500;
const entries = new Map<string, Entry>();

/** The course's gradebook version (0 before its first change). */
export async function courseVersion(courseId: number): Promise<string> {
  const [row] = await getSequelize().query<{ version: string }>(
    "select coalesce((select version from gradebook_versions where course_id = $1), 0)::text as version",
    { bind: [courseId], type: QueryTypes.SELECT },
  );
  return row.version;
}

/** The gradebook version of a practical's course, or null when there is no such practical. */
export async function sessionCourseVersion(sessionId: number): Promise<string | null> {
  const [row] = await getSequelize().query<{ version: string }>(
    "select coalesce(gv.version, 0)::text as version from lab_sessions ls left join gradebook_versions gv on gv.course_id = ls.course_id where ls.id = $1",
    { bind: [sessionId], type: QueryTypes.SELECT },
  );
  return row?.version ?? null;
}

function deepFreeze<T>(value: T): T {
  if (value && typeof value === "object" && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const v of Object.values(value)) deepFreeze(v);
  }
  return value;
}

export interface Built<T> {
  value: T;
  /** ms since the epoch after which the value must be built again (Infinity: only on a change) */
  validUntil: number;
}

/** The value under `key` for this version, building it when missing, outdated or expired. */
export async function cached<T>(key: string, version: string, build: () => Promise<Built<T>>): Promise<T> {
  const hit = entries.get(key);
  if (hit && hit.version === version && Date.now() < hit.validUntil) return hit.value as T;
  const built = await build();
  if (entries.size >= MAX_ENTRIES) entries.delete(entries.keys().next().value!);
  entries.delete(key);
  entries.set(key, { version, validUntil: built.validUntil, value: deepFreeze(built.value) });
  return built.value;
}

/** The JSON text of a cached value, made once per entry (the API sends it as it is). */
export function cachedJson(key: string, value: unknown): string {
  const hit = entries.get(key);
  if (hit && hit.value === value) return (hit.json ??= JSON.stringify(value));
  return JSON.stringify(value);
}
