// Query parameters of the gradebook API, checked strictly: an unknown parameter or value is a 400
// that names it, so a typo is never silently ignored.
import { badQuery, type QueryProblem } from "./access.server";
import { parseId } from "../ids.server";
import type { SessionGradebookRow } from "./session.server";

const STATUS = ["marked", "queued", "refused", "failed", "none"] as const;

function unknownParams(url: URL, allowed: string[]): QueryProblem[] {
  return [...url.searchParams.keys()]
    .filter((k) => !allowed.includes(k))
    .map((k) => ({ path: `query.${k}`, message: `Unknown query parameter "${k}"; this path takes ${allowed.map((a) => `"${a}"`).join(", ") || "none"}.` }));
}

/** `?status=marked,none` (none: no upload yet) and `?flagged=true|false`. */
export function sessionRowFilter(url: URL): (row: SessionGradebookRow) => boolean {
  const errors = unknownParams(url, ["status", "flagged"]);
  const statusRaw = url.searchParams.get("status");
  const statuses = statusRaw === null ? null : statusRaw.split(",").map((s) => s.trim());
  for (const s of statuses ?? []) {
    if (!(STATUS as readonly string[]).includes(s)) errors.push({ path: "query.status", message: `"${s}" is not a status; use ${STATUS.join(", ")} (comma-separated).` });
  }
  const flaggedRaw = url.searchParams.get("flagged");
  if (flaggedRaw !== null && flaggedRaw !== "true" && flaggedRaw !== "false") errors.push({ path: "query.flagged", message: `flagged is true or false, not "${flaggedRaw}".` });
  if (errors.length) badQuery(errors);
  return (row) =>
    (statuses === null || statuses.includes(row.status ?? "none")) &&
    (flaggedRaw === null || (row.flags.length > 0) === (flaggedRaw === "true"));
}

/** `?sessions=3,5`: only these practicals' columns (each must be one of the course's). */
export function courseSessionFilter(url: URL, known: number[]): Set<number> | null {
  const errors = unknownParams(url, ["sessions"]);
  const raw = url.searchParams.get("sessions");
  let ids: Set<number> | null = null;
  if (raw !== null) {
    ids = new Set();
    for (const part of raw.split(",")) {
      const id = parseId(part.trim());
      if (id === null) errors.push({ path: "query.sessions", message: `"${part}" is not a practical id (a comma-separated list of whole numbers).` });
      else if (!known.includes(id)) errors.push({ path: "query.sessions", message: `Practical ${id} is not in this course's gradebook.` });
      else ids.add(id);
    }
  }
  if (errors.length) badQuery(errors);
  return ids;
}
