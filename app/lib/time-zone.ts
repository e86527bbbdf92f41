// A course's time zone (an IANA zone name, e.g. "Europe/Berlin"): deadlines are entered and shown
// in the lab's own wall time and stored as UTC. The zone rules come from the ICU data inside
// Node's and the browser's Intl; no table of our own.
const partsFormats = new Map<string, Intl.DateTimeFormat>();

function partsFormat(zone: string): Intl.DateTimeFormat {
  let f = partsFormats.get(zone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", { timeZone: zone, hourCycle: "h23", year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit", second: "2-digit" });
    partsFormats.set(zone, f);
  }
  return f;
}

/** True for a zone name Intl knows ("UTC", "Europe/Berlin"); false for anything else. */
export function isTimeZone(zone: unknown): zone is string {
  if (typeof zone !== "string" || !zone || zone.length > 64) return false;
  try {
    partsFormat(zone);
    return true;
  } catch {
    return false;
  }
}

/** Every zone name to choose from, UTC first. */
export function timeZoneNames(): string[] {
  const names = (Intl as unknown as { supportedValuesOf?: (k: string) => string[] }).supportedValuesOf?.("timeZone") ?? [];
  return ["UTC", ...names.filter((z) => z !== "UTC")];
}

/** The wall-clock fields of a moment in `zone`. */
function wallFields(at: Date, zone: string) {
  const get: Record<string, number> = {};
  for (const p of partsFormat(zone).formatToParts(at)) if (p.type !== "literal") get[p.type] = Number(p.value);
  return { y: get.year, mo: get.month, d: get.day, h: get.hour, mi: get.minute, s: get.second };
}

/** Minutes the zone's wall clock is ahead of UTC at that moment (+60 for Central European winter time). */
export function offsetMinutes(at: Date, zone: string): number {
  const w = wallFields(at, zone);
  const asUtc = Date.UTC(w.y, w.mo - 1, w.d, w.h, w.mi, w.s);
  return Math.round((asUtc - Math.floor(at.getTime() / 1000) * 1000) / 60_000);
}

/** A moment as "YYYY-MM-DDTHH:MM" on the zone's wall clock (what a datetime-local field shows). */
export function wallTime(at: Date, zone: string): string {
  const w = wallFields(at, zone);
  const two = (n: number) => String(n).padStart(2, "0");
  return `${w.y}-${two(w.mo)}-${two(w.d)}T${two(w.h)}:${two(w.mi)}`;
}

export type WallTimeReading = { ok: true; at: Date } | { ok: false; reason: "format" | "gap" };

/**
 * "YYYY-MM-DDTHH:MM[:SS]" on the zone's wall clock as a UTC moment. A time the clocks skip (the
 * hour lost when summer time starts) is refused as "gap"; a time that happens twice (the hour
 * repeated when it ends) is the first of the two.
 */
export function fromWallTime(text: string, zone: string): WallTimeReading {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(text);
  if (!m) return { ok: false, reason: "format" };
  const [y, mo, d, h, mi, s] = m.slice(1).map((x) => Number(x ?? 0));
  const asUtc = Date.UTC(y, mo - 1, d, h, mi, s);
  // Try the offsets in force just before and just after: the earlier candidate that reads back
  // as the same wall time wins; if neither does, the wall time does not exist.
  const offsets = [offsetMinutes(new Date(asUtc - 86_400_000), zone), offsetMinutes(new Date(asUtc + 86_400_000), zone), offsetMinutes(new Date(asUtc), zone)];
  const candidates = [...new Set(offsets)].map((o) => asUtc - o * 60_000).sort((a, b) => a - b);
  const wanted = text.slice(0, 16);
  for (const c of candidates) if (wallTime(new Date(c), zone) === wanted) return { ok: true, at: new Date(c) };
  return { ok: false, reason: "gap" };
}
