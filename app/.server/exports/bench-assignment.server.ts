// The bench assignment for the technicians and the prep room: bench, group, members, feed,
// temperature and the stock volumes that make up each reactor, as .xlsx and CSV from one column
// description (so the two agree), beside the printable prep list. Staff only.
import { Bench } from "../db/lab-sessions.server";
import { Group, GroupMember } from "../db/groups.server";
import { User } from "../db/models.server";
import { requireUser } from "../guards.server";
import { parseId } from "../ids.server";
import { sessionAccess } from "../planning/sessions.server";
import { whileDatabaseUp } from "../db/unavailable.server";
import { addTableSheet, CSV_TYPE, downloadName, downloadResponse, newWorkbook, workbookBytes, XLSX_TYPE, type SheetColumn } from "./workbook.server";
import { toCsv } from "~/lib/exports/table";
import { mixingVolumes } from "~/lib/planning/dilution";
import { FEED_RATIO_HEADER, feedRatio, nuOf } from "~/lib/planning/feed-ratio";
import { naturalCompare } from "~/lib/natural-order";

export interface BenchAssignmentRow {
  position: number;
  label: string;
  group: string | null;
  members: string;
  CA0: number;
  CB0: number;
  feedRatio: number;
  temperatureC: number;
  stockAMl: number;
  stockBMl: number;
  waterMl: number;
}

export function benchAssignmentColumns(species: { A: string; B: string }): SheetColumn<BenchAssignmentRow>[] {
  return [
    { header: "Bench", kind: "text", value: (r) => r.label, width: 8 },
    { header: "Group", kind: "text", value: (r) => r.group, width: 16 },
    { header: "Members", kind: "text", value: (r) => r.members, width: 40 },
    { header: `CA0 (${species.A})`, unit: "mol/L", kind: "number", value: (r) => r.CA0, numFmt: "0.0000" },
    { header: `CB0 (${species.B})`, unit: "mol/L", kind: "number", value: (r) => r.CB0, numFmt: "0.0000" },
    { header: FEED_RATIO_HEADER, kind: "number", value: (r) => r.feedRatio, numFmt: "0.00" },
    { header: "Temperature", unit: "°C", kind: "number", value: (r) => r.temperatureC, numFmt: "0.0" },
    { header: `Stock of ${species.A}`, unit: "mL", kind: "number", value: (r) => r.stockAMl, numFmt: "0.00" },
    { header: `Stock of ${species.B}`, unit: "mL", kind: "number", value: (r) => r.stockBMl, numFmt: "0.00" },
    { header: "Water", unit: "mL", kind: "number", value: (r) => r.waterMl, numFmt: "0.00" },
  ];
}

/** The rows in bench order; members by name, separated by "; ". */
export async function benchAssignmentRows(sessionId: number, session: { reactorVolumeMl: number; stockAMolL: number; stockBMolL: number }, nu: number): Promise<BenchAssignmentRow[]> {
  const benches = await Bench.findAll({
    where: { sessionId },
    include: [{ model: Group, as: "group", include: [{ model: GroupMember, as: "members", include: [{ model: User, as: "user", attributes: ["displayName"] }] }] }],
    order: [["position", "ASC"]],
  });
  return benches.map((b) => {
    const v = mixingVolumes(b, session);
    const names = (b.group?.members ?? []).map((m) => m.user?.displayName ?? "").filter(Boolean).sort(naturalCompare);
    return {
      position: b.position,
      label: b.label,
      group: b.group?.name ?? null,
      members: names.join("; "),
      CA0: b.CA0,
      CB0: b.CB0,
      feedRatio: feedRatio(b.CA0, b.CB0, nu),
      temperatureC: b.temperatureC,
      stockAMl: v.stockAMl,
      stockBMl: v.stockBMl,
      waterMl: v.waterMl,
    };
  });
}

/** GET /sessions/:id/benches.(xlsx|csv): answered like the other downloads (401/403/404 JSON; a Bearer token works). */
export function benchAssignmentDownload(request: Request, rawId: string | undefined, format: "xlsx" | "csv"): Promise<Response> {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    const id = parseId(rawId);
    if (id === null) return Response.json({ error: "There is no practical with this id." }, { status: 404 });
    const access = await sessionAccess(user, id, true);
    if (!access.staff) return Response.json({ error: "The bench assignment is for the course's staff." }, { status: 403 });
    const { session, reaction, course } = access;
    const rows = await benchAssignmentRows(session.id, session, nuOf(reaction));
    const columns = benchAssignmentColumns({ A: reaction.speciesA, B: reaction.speciesB });
    const now = new Date();
    const name = downloadName([course.code, session.title, "benches"], now, format);
    const empty = "This practical has no benches.";
    if (format === "csv") return downloadResponse(toCsv(columns, rows, empty), name, CSV_TYPE);
    const wb = newWorkbook(`${course.code} ${session.title}: bench assignment`);
    addTableSheet(wb, new Set(), "Benches", columns, rows, {
      emptyNote: empty,
      aside: [
        ["Practical", session.title],
        ["Lab day", session.date],
        ["Reactor volume (mL)", session.reactorVolumeMl],
        [`Stock of ${reaction.speciesA} (mol/L)`, session.stockAMolL],
        [`Stock of ${reaction.speciesB} (mol/L)`, session.stockBMolL],
        ["Exported", now],
      ],
    });
    return downloadResponse(await workbookBytes(wb), name, XLSX_TYPE);
  });
}
