// One line about a practical's rows: how many groups, marked, waiting, without an upload.
import type { SessionGradebookRow } from "~/.server/gradebook/session.server";

export function gradebookSummary(rows: SessionGradebookRow[]): string {
  const count = (f: (r: SessionGradebookRow) => boolean) => rows.filter(f).length;
  const parts = [
    `${rows.length} ${rows.length === 1 ? "group" : "groups"} at a bench`,
    `${count((r) => r.mark !== null)} with a mark`,
    `${count((r) => r.status === null)} without an upload`,
  ];
  const waiting = count((r) => r.status === "queued");
  if (waiting) parts.push(`${waiting} being marked`);
  const flagged = count((r) => r.flags.length > 0);
  if (flagged) parts.push(`${flagged} flagged`);
  return parts.join(" · ");
}
