// What a submission looks like to whoever asks. Staff see everything. A member of the group sees,
// before release, the status, version, problems and the preview fit (no reference, no tolerance,
// no flag that compares with the reference, no mark); after release the mark, its parts and the
// feedback, and the reference only if the instructor chose to show it.
import type { FitResult } from "~/lib/kinetics";
import { Submission, effectiveMark } from "../db/submissions.server";
import type { Viewer } from "./context.server";
import { ownLine, type OwnLine } from "~/lib/marking/estimators";

/** Flags that are computed against the reference value: kept from students. */
const REFERENCE_FLAGS = new Set(["unit-slip"]);

/** The fit a student may see: the reference comparison removed. */
export function studentFit(fit: unknown): FitResult | null {
  if (!fit) return null;
  const f = { ...(fit as FitResult) };
  delete (f as { reference?: unknown }).reference;
  f.flags = (f.flags ?? []).filter((x) => !REFERENCE_FLAGS.has(x.code));
  return f;
}

/** The reason a version failed, for the group: a practical's own settings are named, not quoted. */
function groupWords(error: string | null): string {
  if (!error) return "The readings could not be marked. Upload the file again, or ask your instructor.";
  if (/\breference\b|kRef|EaKJ|TrefC/.test(error)) return "The practical's settings could not be used to mark this version; your instructor sees why.";
  return error;
}

export interface SubmissionView {
  id: number;
  groupId: number;
  sessionId: number;
  version: number;
  status: string;
  submittedAt: string;
  late: boolean;
  originalName: string | null;
  problems: Array<{ row: number; column: string; message: string }>;
  fit: FitResult | null;
  flags: Array<{ code: string; message: string; rows: number[] }>;
  feedback: string[];
  mark: number | null;
  released: boolean;
  measured: string;
  timeUnit: string;
  concentrationUnit: string;
  reportedK: number | null;
  reportedMethod: string | null;
  readings: { time: unknown; value: unknown; n: number; notes: string[] } | null;
  /** staff, and students after release */
  parts?: { experimentPart: number | null; analysisPart: number | null; latePenalty: number | null; autoMark: number | null; overrideMark: number | null };
  /** staff only */
  checks?: unknown;
  overrideReason?: string | null;
  /** why marking failed (staff: as stored; the group: in its words) */
  markingError?: string | null;
  excluded?: unknown;
  /** staff only: a reviewer's stated corrections (the group reads them in its feedback) */
  corrections?: Array<{ kind: string; from: string; to: string; reason: string; at: string }>;
  reviewState?: string;
  markingRuns?: number;
  /** staff only: a reviewer chose this version to count in the gradebook */
  countsChosen?: boolean;
  /** after release, when the instructor shows it */
  kRefAtT?: number;
  /** the group's own straight line: the k the analysis check compares the reported k with */
  ownLine: OwnLine | null;
}

export function submissionView(s: Submission, viewer: Viewer, release: { releasedAt: Date | null; showsReference: boolean }, originalName: string | null): SubmissionView {
  const withLine = (v: SubmissionView): SubmissionView => ({ ...v, ownLine: v.fit ? ownLine(v.fit, s.checks?.kLine) : null });
  return withLine(viewOf(s, viewer, release, originalName));
}

function viewOf(s: Submission, viewer: Viewer, release: { releasedAt: Date | null; showsReference: boolean }, originalName: string | null): SubmissionView {
  const released = release.releasedAt !== null;
  const base: SubmissionView = {
    id: s.id,
    groupId: s.groupId,
    sessionId: s.sessionId,
    version: s.version,
    // a failed version shows as failed, with its reason, to the group too (never "being marked")
    status: s.status,
    submittedAt: s.submittedAt.toISOString(),
    late: s.late,
    originalName,
    problems: s.problems ?? [],
    fit: null,
    flags: [],
    feedback: [],
    mark: null,
    released,
    measured: s.measured,
    timeUnit: s.timeUnit,
    concentrationUnit: s.concentrationUnit,
    reportedK: s.reportedK,
    reportedMethod: s.reportedMethod,
    readings: s.readings ? { time: s.readings.time, value: s.readings.value, n: s.readings.points.length, notes: s.readings.notes } : null,
    ownLine: null,
    ...(s.status === "failed" ? { markingError: groupWords(s.markingError) } : {}),
  };
  if (viewer === "staff") {
    return {
      ...base,
      fit: (s.fit as FitResult) ?? null,
      flags: s.flags ?? [],
      feedback: s.feedback ?? [],
      mark: effectiveMark(s),
      parts: { experimentPart: s.experimentPart, analysisPart: s.analysisPart, latePenalty: s.latePenalty, autoMark: s.autoMark, overrideMark: s.overrideMark },
      checks: s.checks,
      overrideReason: s.overrideReason,
      markingError: s.markingError,
      excluded: s.excluded,
      corrections: (s.corrections ?? []).map((c) => ({ kind: c.kind, from: c.from, to: c.to, reason: c.reason, at: c.at })),
      reviewState: s.reviewState,
      markingRuns: s.markingRuns,
      countsChosen: s.countsChosen,
    };
  }
  const fit = studentFit(s.fit);
  if (!released) return { ...base, fit, flags: fit?.flags ?? [] };
  const view: SubmissionView = {
    ...base,
    fit: release.showsReference ? ((s.fit as FitResult) ?? null) : fit,
    flags: release.showsReference ? (s.flags ?? []) : (fit?.flags ?? []),
    feedback: s.feedback ?? [],
    mark: effectiveMark(s),
    parts: { experimentPart: s.experimentPart, analysisPart: s.analysisPart, latePenalty: s.latePenalty, autoMark: s.autoMark, overrideMark: s.overrideMark },
  };
  if (release.showsReference && s.checks) view.kRefAtT = s.checks.kRefAtT;
  return view;
}
