// One date style on every screen: "Thu, 3 Dec 2026, 14:05 UTC", made by Intl.DateTimeFormat in
// the course's time zone (UTC until a course names its own).
const formats = new Map<string, Intl.DateTimeFormat>();

function formatFor(timeZone: string, withTime: boolean): Intl.DateTimeFormat {
  const key = `${timeZone}|${withTime}`;
  let f = formats.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat("en-GB", {
      timeZone,
      weekday: "short",
      day: "numeric",
      month: "short",
      year: "numeric",
      ...(withTime ? { hour: "2-digit", minute: "2-digit", hour12: false, timeZoneName: "short" } : {}),
    });
    formats.set(key, f);
  }
  return f;
}

/** A moment (ISO text or Date) as date and time in `timeZone`, with the zone's name. */
export function formatDateTime(at: string | Date | null | undefined, timeZone = "UTC"): string {
  if (at === null || at === undefined) return "—";
  const d = typeof at === "string" ? new Date(at) : at;
  if (Number.isNaN(d.getTime())) return "—";
  return formatFor(timeZone, true).format(d);
}

/** A calendar day ("2026-12-03", as stored for a practical's date) in the same style. */
export function formatDay(day: string | null | undefined): string {
  if (!day) return "—";
  const d = new Date(`${day}T12:00:00Z`);
  if (Number.isNaN(d.getTime())) return day;
  return formatFor("UTC", false).format(d);
}

/** True when "YYYY-MM-DD" names a day of the calendar (31 February does not exist). */
export function isRealDay(text: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const t = new Date(Date.UTC(y, mo - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d;
}

/** True when "YYYY-MM-DDTHH:MM" (seconds optional, nothing after) is a real day and time of day. */
export function isRealDateTime(text: string): boolean {
  const m = /^(\d{4}-\d{2}-\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(text);
  if (!m) return false;
  return isRealDay(m[1]) && Number(m[2]) < 24 && Number(m[3]) < 60 && Number(m[4] ?? 0) < 60;
}
