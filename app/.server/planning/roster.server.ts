// Roster import: a CSV (papaparse) or .xlsx (exceljs) file of students -> a preview that sorts
// every row into new, unchanged, updated or bad (with its row number and reason) -> on confirm,
// everything in one transaction, with an invitation for each person new to Ratebook.
import Papa from "papaparse";
import ExcelJS from "exceljs";
import { checkCsvBounds, CsvBoundsError, ROSTER_CSV_LIMITS } from "~/lib/readings/csv-bounds";
import { pickDelimiter } from "~/lib/readings/csv";
import { checkXlsxBounds, ROSTER_XLSX_LIMITS, XlsxBoundsError } from "~/.server/readings/xlsx-bounds.server";
import { Op } from "sequelize";
import { CourseMembership, User, Course, sequelize } from "../db/models.server";
import { Group, GroupMember } from "../db/groups.server";
import { emailProblem, normaliseEmail, NOT_AN_ADDRESS } from "~/lib/email-address";
import { issueToken } from "../tokens.server";
import { recordAudit } from "../audit.server";
import { queueMail } from "../mail/outbox.server";
import { CourseInvitation } from "../db/course-invitations.server";
import { inviteExistingPerson } from "../course-invitations.server";

export const ROSTER_MAX_BYTES = 2 * 1024 * 1024;

export interface RosterRow {
  /** 1-based row number in the file, the header being row 1 */
  row: number;
  studentNumber: string;
  name: string;
  email: string;
  group: string;
}

export type RowStatus = "new" | "unchanged" | "updated" | "bad";
export interface PreviewRow extends RosterRow {
  status: RowStatus;
  /** what changes (updated) or what is wrong (bad) */
  notes: string[];
}

export class RosterFileError extends Error {}

const HEADERS: Record<keyof Omit<RosterRow, "row">, string[]> = {
  studentNumber: ["student id", "student_id", "studentid", "student number", "student no", "id", "number"],
  name: ["name", "full name", "student name", "display name"],
  email: ["email", "e-mail", "email address", "e-mail address", "mail"],
  group: ["group", "group name", "team"],
};

function looksBinary(bytes: Uint8Array) {
  const n = Math.min(bytes.length, 4096);
  for (let i = 0; i < n; i++) if (bytes[i] === 0) return true;
  return false;
}

/** Rows of cells from the file; refuses files that are not a table, saying why. */
export async function readTable(fileName: string, bytes: Uint8Array): Promise<string[][]> {
  if (bytes.length === 0) throw new RosterFileError(`${fileName} is empty.`);
  if (bytes.length > ROSTER_MAX_BYTES) throw new RosterFileError(`${fileName} is ${(bytes.length / 1048576).toFixed(1)} MiB; a roster may be at most 2 MiB.`);
  const isZip = bytes[0] === 0x50 && bytes[1] === 0x4b;
  if (isZip) {
    let archive: Uint8Array;
    try {
      // exceljs reads only the checked parts, repacked (see xlsx-bounds.server.ts)
      archive = (await checkXlsxBounds(bytes, fileName, ROSTER_XLSX_LIMITS)).archive;
    } catch (error) {
      if (error instanceof XlsxBoundsError) throw new RosterFileError(error.message);
      throw error;
    }
    const wb = new ExcelJS.Workbook();
    try {
      await wb.xlsx.load(archive.buffer.slice(archive.byteOffset, archive.byteOffset + archive.byteLength) as ArrayBuffer);
    } catch {
      throw new RosterFileError(`${fileName} is a zip file but not a readable .xlsx workbook.`);
    }
    const sheet = wb.worksheets[0];
    if (!sheet) throw new RosterFileError(`${fileName} has no worksheet.`);
    const rows: string[][] = [];
    sheet.eachRow({ includeEmpty: true }, (row, n) => {
      const cells: string[] = [];
      for (let c = 1; c <= Math.max(row.cellCount, 1); c++) {
        const v = row.getCell(c).value as unknown;
        const t = v && typeof v === "object" ? ((v as { text?: string }).text ?? (v as { result?: unknown }).result ?? "") : (v ?? "");
        cells.push(String(t).trim());
      }
      rows[n - 1] = cells;
    });
    return Array.from(rows, (r) => r ?? []);
  }
  if (looksBinary(bytes) || (bytes[0] === 0x89 && bytes[1] === 0x50)) throw new RosterFileError(`${fileName} is not a CSV or .xlsx table (it holds binary data; is it an image renamed?).`);
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes).replace(/^\uFEFF/, "");
  } catch {
    throw new RosterFileError(`${fileName} is not UTF-8 text; save the roster as CSV UTF-8 or .xlsx.`);
  }
  try {
    checkCsvBounds(text, pickDelimiter(text.split(/\r\n|\r|\n/).filter((l) => l.trim() !== "")), fileName, ROSTER_CSV_LIMITS);
  } catch (error) {
    if (error instanceof CsvBoundsError) throw new RosterFileError(error.message);
    throw error;
  }
  const parsed = Papa.parse<string[]>(text, { skipEmptyLines: false });
  return parsed.data.map((r) => r.map((c) => String(c ?? "").trim()));
}

/** The roster rows, or a file-level problem (no header, a required column missing, no data). */
export function rosterRows(fileName: string, table: string[][]): RosterRow[] {
  const headerIndex = table.findIndex((r) => r.some((c) => c));
  if (headerIndex < 0) throw new RosterFileError(`${fileName} has no rows.`);
  const header = table[headerIndex].map((h) => h.toLowerCase().replace(/\s+/g, " ").trim());
  const col: Partial<Record<keyof typeof HEADERS, number>> = {};
  for (const [key, names] of Object.entries(HEADERS) as Array<[keyof typeof HEADERS, string[]]>) {
    const i = header.findIndex((h) => names.includes(h));
    if (i >= 0) col[key] = i;
  }
  const missing = (["studentNumber", "name", "email"] as const).filter((k) => col[k] === undefined);
  if (missing.length) {
    const names = { studentNumber: "student ID", name: "name", email: "e-mail" };
    throw new RosterFileError(`${fileName}, row ${headerIndex + 1}: the header has no ${missing.map((m) => names[m]).join(", ")} column (found: ${table[headerIndex].join(", ") || "nothing"}).`);
  }
  const rows: RosterRow[] = [];
  for (let i = headerIndex + 1; i < table.length; i++) {
    const r = table[i];
    if (!r.some((c) => c)) continue;
    rows.push({
      row: i + 1,
      studentNumber: r[col.studentNumber!] ?? "",
      name: r[col.name!] ?? "",
      email: normaliseEmail(r[col.email!] ?? ""),
      group: col.group !== undefined ? (r[col.group] ?? "") : "",
    });
  }
  if (!rows.length) throw new RosterFileError(`${fileName} has a header but no student rows.`);
  return rows;
}

/** Sorts each row against the course as it is now. Nothing is written. */
export async function previewRoster(courseId: number, rows: RosterRow[]): Promise<PreviewRow[]> {
  const emails = rows.map((r) => r.email).filter(Boolean);
  const users = await User.findAll({ where: { email: { [Op.in]: emails.length ? emails : [""] } } });
  const byEmail = new Map(users.map((u) => [u.email, u]));
  const memberships = await CourseMembership.findAll({ where: { courseId } });
  const membershipByUser = new Map(memberships.map((m) => [m.userId, m]));
  const membershipByNumber = new Map(memberships.filter((m) => m.studentNumber).map((m) => [m.studentNumber!, m]));
  const groupMembers = await GroupMember.findAll({ where: { courseId }, include: [{ model: Group, as: "group" }] });
  const groupByUser = new Map(groupMembers.map((g) => [g.userId, g.group!.name]));
  const invitedIds = new Set((await CourseInvitation.findAll({ where: { courseId }, attributes: ["userId"] })).map((i) => i.userId));

  const seenNumber = new Map<string, number>();
  const seenEmail = new Map<string, number>();
  return rows.map((r) => {
    const notes: string[] = [];
    if (!r.studentNumber) notes.push("the student ID is empty");
    else if (r.studentNumber.length > 40) notes.push("the student ID is longer than 40 characters");
    if (!r.name) notes.push("the name is empty");
    else if (r.name.length > 120) notes.push("the name is longer than 120 characters");
    const badEmail = emailProblem(r.email, "the student's");
    if (badEmail) notes.push(r.email ? `the e-mail ${r.email} is malformed${badEmail === NOT_AN_ADDRESS ? "" : ` (${badEmail})`}` : "the e-mail is missing");
    if (r.group.length > 80) notes.push("the group name is longer than 80 characters");
    if (r.studentNumber && seenNumber.has(r.studentNumber)) notes.push(`student ID ${r.studentNumber} is also on row ${seenNumber.get(r.studentNumber)}`);
    if (r.email && seenEmail.has(r.email)) notes.push(`e-mail ${r.email} is also on row ${seenEmail.get(r.email)}`);
    if (r.studentNumber && !seenNumber.has(r.studentNumber)) seenNumber.set(r.studentNumber, r.row);
    if (r.email && !seenEmail.has(r.email)) seenEmail.set(r.email, r.row);
    const user = byEmail.get(r.email);
    const membership = user ? membershipByUser.get(user.id) : undefined;
    if (membership && membership.role !== "student") notes.push(`${r.email} is ${membership.role} in this course, not a student`);
    const holder = r.studentNumber ? membershipByNumber.get(r.studentNumber) : undefined;
    if (holder && holder.userId !== user?.id) notes.push(`student ID ${r.studentNumber} belongs to another student of this course`);
    if (notes.length) return { ...r, status: "bad" as const, notes };
    // An existing account keeps its own name (the file cannot rename anybody, the admin
    // included) and is invited; it joins only when its owner accepts.
    const keepsName = user && user.displayName !== r.name ? [`keeps the account's name ${user.displayName}`] : [];
    if (!membership) {
      if (!user) return { ...r, status: "new" as const, notes: ["gets an invitation e-mail"] };
      const already = invitedIds.has(user.id) ? "; already invited, the invitation is sent again" : "";
      return { ...r, status: "new" as const, notes: [`has a Ratebook account: invited to join, joins when they accept${already}`, ...keepsName] };
    }
    const changes: string[] = [];
    if (membership.studentNumber !== r.studentNumber) changes.push(`student ID ${membership.studentNumber ?? "none"} → ${r.studentNumber}`);
    const oldGroup = groupByUser.get(user!.id) ?? "";
    if (r.group && r.group !== oldGroup) changes.push(`group ${oldGroup || "none"} → ${r.group}`);
    return { ...r, status: changes.length ? ("updated" as const) : ("unchanged" as const), notes: [...changes, ...keepsName] };
  });
}

export interface ImportSummary {
  added: number;
  updated: number;
  unchanged: number;
  invited: number;
  /** existing accounts invited to the course (they join when they accept) */
  invitedExisting: number;
  groupsCreated: number;
}

/**
 * Saves the good rows in one transaction (checked again against the course as it is now); any
 * bad row refuses the whole import, so nothing is half-saved.
 */
export async function importRoster(actor: User, courseId: number, rows: RosterRow[]): Promise<{ ok: true; value: ImportSummary } | { ok: false; preview: PreviewRow[]; message: string }> {
  const preview = await previewRoster(courseId, rows);
  const bad = preview.filter((r) => r.status === "bad");
  if (bad.length) return { ok: false, preview, message: `${bad.length} row(s) have problems; fix them in the file and upload it again.` };
  const course = await Course.findByPk(courseId);
  const summary: ImportSummary = { added: 0, updated: 0, unchanged: 0, invited: 0, invitedExisting: 0, groupsCreated: 0 };
  await sequelize.transaction(async (transaction) => {
    const groups = new Map((await Group.findAll({ where: { courseId }, transaction })).map((g) => [g.name, g]));
    for (const r of preview) {
      if (r.status === "unchanged") {
        summary.unchanged++;
        continue;
      }
      let user = await User.findOne({ where: { email: r.email }, transaction });
      if (user && !(await CourseMembership.count({ where: { courseId, userId: user.id }, transaction }))) {
        await inviteExistingPerson(actor, course!, user, { role: "student", studentNumber: r.studentNumber, groupName: r.group }, transaction);
        summary.invitedExisting++;
        continue;
      }
      if (!user) user = await User.create({ email: r.email, displayName: r.name, role: "member", passwordHash: null }, { transaction });
      const [membership, created] = await CourseMembership.findOrCreate({
        where: { courseId, userId: user.id },
        defaults: { courseId, userId: user.id, role: "student", studentNumber: r.studentNumber },
        transaction,
      });
      if (!created && membership.studentNumber !== r.studentNumber) await membership.update({ studentNumber: r.studentNumber }, { transaction });
      if (r.group) {
        let group = groups.get(r.group);
        if (!group) {
          group = await Group.create({ courseId, name: r.group }, { transaction });
          groups.set(r.group, group);
          summary.groupsCreated++;
        }
        await GroupMember.destroy({ where: { courseId, userId: user.id }, transaction });
        await GroupMember.create({ groupId: group.id, courseId, userId: user.id }, { transaction });
      }
      if (created) summary.added++;
      else summary.updated++;
      if (!user.passwordHash && created) {
        const token = await issueToken(user.id, "invitation", actor.id, transaction);
        await queueMail(user.email, "invitation", { name: r.name, inviter: actor.displayName, courseCode: course!.code, courseTitle: course!.title, role: "a student", token }, { transaction });
        summary.invited++;
      }
    }
    await recordAudit({ actorId: actor.id, action: "roster.imported", entityType: "course", entityId: courseId, after: summary }, transaction);
  });
  return { ok: true, value: summary };
}
