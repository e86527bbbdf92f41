// Every version a group has sent, newest first, with its stored file's facts.
import { Submission, SubmissionFile, effectiveMark } from "../db/submissions.server";
import type { Viewer } from "./context.server";
import { releaseInfo } from "./review.server";

export interface VersionSummary {
  id: number;
  sessionId: number;
  version: number;
  status: string;
  submittedAt: string;
  late: boolean;
  originalName: string;
  size: number;
  sha256: string;
  /** staff always; the group after release */
  mark: number | null;
  released: boolean;
}

export async function groupSubmissions(groupId: number, viewer: Viewer, sessionId?: number): Promise<VersionSummary[]> {
  const subs = await Submission.findAll({
    where: sessionId ? { groupId, sessionId } : { groupId },
    attributes: ["id", "sessionId", "version", "status", "submittedAt", "late", "autoMark", "overrideMark"],
    include: [{ model: SubmissionFile, as: "file", attributes: ["originalName", "size", "sha256"] }],
    order: [["sessionId", "DESC"], ["version", "DESC"]],
  });
  const releases = new Map<number, boolean>();
  for (const id of new Set(subs.map((s) => s.sessionId))) releases.set(id, (await releaseInfo(id)).releasedAt !== null);
  return subs.map((s) => {
    const released = releases.get(s.sessionId) ?? false;
    return {
      id: s.id,
      sessionId: s.sessionId,
      version: s.version,
      status: s.status === "failed" && viewer !== "staff" ? "queued" : s.status,
      submittedAt: s.submittedAt.toISOString(),
      late: s.late,
      originalName: s.file?.originalName ?? "",
      size: s.file?.size ?? 0,
      sha256: s.file?.sha256 ?? "",
      mark: viewer === "staff" || released ? effectiveMark(s) : null,
      released,
    };
  });
}
