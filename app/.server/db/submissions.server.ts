// A group's submitted versions, their original files and reviewers' comments (schema: 0015).
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { getSequelize } from "./sequelize.server";
import { User } from "./models.server";
import type { ReadingProblem } from "~/lib/readings/extract";
import type { Correction } from "~/lib/marking/corrections";

export const SUBMISSION_STATUSES = ["queued", "marked", "refused", "failed"] as const;
export type SubmissionStatus = (typeof SUBMISSION_STATUSES)[number];
export type ReviewState = "to-check" | "checked";

/** What was read from the file (enough to mark again without reading it again). */
export interface StoredReadings {
  points: [number, number][];
  rowNumbers: number[];
  time: { letter: string; header: string; unit: string };
  value: { letter: string; header: string; unit: string };
  notes: string[];
  /** a row marked as the final reading (∞, inf, final): its file row, value and time cell */
  final?: { row: number; value: number; label: string };
}

export interface Exclusion {
  row: number;
  reason: string;
  byId: number;
  at: string;
}

/** The numbers behind a mark, kept with it (staff see them; students after release, in part). */
export interface StoredChecks {
  kMarking: number;
  kLine: number;
  kRefAtT: number;
  experiment: { deviationPct: number; band: string; score: number };
  analysis: { deviationPct: number; band: string; score: number };
  rowNumbers: number[];
  /** how the readings became the engine's measurement (titres converted, where S0 and S∞ came from) */
  notes?: string[];
  /** what the group's k was judged against: its straight line, or the engine's curve fit */
  analysisAgainst?: "line" | "curve";
  kAnalysis?: number;
  /** what the practical's policy took off for corrected slips (absent when none) */
  correction?: { count: number; pctEach: number; marks: number } | null;
}

export class Submission extends Model<InferAttributes<Submission>, InferCreationAttributes<Submission>> {
  declare id: CreationOptional<number>;
  declare groupId: number;
  declare sessionId: number;
  declare benchId: number | null;
  declare version: number;
  declare submittedById: number | null;
  declare submittedAt: Date;
  declare late: boolean;
  declare status: SubmissionStatus;
  declare timeColumn: string | null;
  declare valueColumn: string | null;
  declare measured: string;
  declare timeUnit: string;
  declare concentrationUnit: string;
  declare reportedK: number | null;
  declare reportedMethod: string | null;
  declare problems: CreationOptional<ReadingProblem[]>;
  declare readings: StoredReadings | null;
  declare fit: CreationOptional<object | null>;
  declare flags: CreationOptional<Array<{ code: string; message: string; rows: number[] }>>;
  declare feedback: CreationOptional<string[]>;
  declare checks: CreationOptional<StoredChecks | null>;
  declare experimentPart: CreationOptional<number | null>;
  declare analysisPart: CreationOptional<number | null>;
  declare latePenalty: CreationOptional<number | null>;
  declare autoMark: CreationOptional<number | null>;
  declare overrideMark: CreationOptional<number | null>;
  declare overrideReason: CreationOptional<string | null>;
  declare excluded: CreationOptional<Exclusion[]>;
  /** a reviewer's stated corrections (migration 0049), applied and priced at every re-mark */
  declare corrections: CreationOptional<Correction[]>;
  declare markedAt: CreationOptional<Date | null>;
  declare markingRuns: CreationOptional<number>;
  declare markingError: CreationOptional<string | null>;
  declare reviewState: CreationOptional<ReviewState>;
  /** a reviewer chose this version to count in the gradebook (at most one per group and practical) */
  declare countsChosen: CreationOptional<boolean>;
  declare reviewedById: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare file?: SubmissionFile;
  declare submittedBy?: User | null;
}

export class SubmissionFile extends Model<InferAttributes<SubmissionFile>, InferCreationAttributes<SubmissionFile>> {
  declare submissionId: number;
  declare bytes: Buffer;
  declare size: number;
  declare sha256: string;
  declare contentType: string;
  declare originalName: string;
  declare createdAt: CreationOptional<Date>;
}

export class SubmissionComment extends Model<InferAttributes<SubmissionComment>, InferCreationAttributes<SubmissionComment>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare authorId: number | null;
  declare body: string;
  declare createdAt: CreationOptional<Date>;
  declare author?: User | null;
}

const sequelize = getSequelize();
const json = (fallback: unknown) => ({ type: DataTypes.JSONB, allowNull: false, defaultValue: fallback });

Submission.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    groupId: { type: DataTypes.INTEGER, allowNull: false },
    sessionId: { type: DataTypes.INTEGER, allowNull: false },
    benchId: { type: DataTypes.INTEGER, allowNull: true },
    version: { type: DataTypes.INTEGER, allowNull: false },
    submittedById: { type: DataTypes.INTEGER, allowNull: true },
    submittedAt: { type: DataTypes.DATE, allowNull: false },
    late: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    status: { type: DataTypes.STRING(20), allowNull: false },
    timeColumn: { type: DataTypes.STRING(200), allowNull: true },
    valueColumn: { type: DataTypes.STRING(200), allowNull: true },
    measured: { type: DataTypes.STRING(30), allowNull: false },
    timeUnit: { type: DataTypes.STRING(10), allowNull: false },
    concentrationUnit: { type: DataTypes.STRING(10), allowNull: false },
    reportedK: { type: DataTypes.DOUBLE, allowNull: true },
    reportedMethod: { type: DataTypes.STRING(60), allowNull: true },
    problems: json([]),
    readings: { type: DataTypes.JSONB, allowNull: true },
    fit: { type: DataTypes.JSONB, allowNull: true },
    flags: json([]),
    feedback: json([]),
    checks: { type: DataTypes.JSONB, allowNull: true },
    experimentPart: { type: DataTypes.DOUBLE, allowNull: true },
    analysisPart: { type: DataTypes.DOUBLE, allowNull: true },
    latePenalty: { type: DataTypes.DOUBLE, allowNull: true },
    autoMark: { type: DataTypes.DOUBLE, allowNull: true },
    overrideMark: { type: DataTypes.DOUBLE, allowNull: true },
    overrideReason: { type: DataTypes.TEXT, allowNull: true },
    excluded: json([]),
    corrections: json([]),
    markedAt: { type: DataTypes.DATE, allowNull: true },
    markingRuns: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    markingError: { type: DataTypes.TEXT, allowNull: true },
    reviewState: { type: DataTypes.STRING(20), allowNull: false, defaultValue: "to-check" },
    countsChosen: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    reviewedById: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, underscored: true, tableName: "submissions" },
);

SubmissionFile.init(
  {
    submissionId: { type: DataTypes.INTEGER, primaryKey: true },
    bytes: { type: DataTypes.BLOB, allowNull: false },
    size: { type: DataTypes.INTEGER, allowNull: false },
    sha256: { type: DataTypes.STRING(64), allowNull: false },
    contentType: { type: DataTypes.STRING(100), allowNull: false },
    originalName: { type: DataTypes.STRING(255), allowNull: false },
    createdAt: DataTypes.DATE,
  },
  { sequelize, underscored: true, tableName: "submission_files", updatedAt: false },
);

SubmissionComment.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    submissionId: { type: DataTypes.INTEGER, allowNull: false },
    authorId: { type: DataTypes.INTEGER, allowNull: true },
    body: { type: DataTypes.TEXT, allowNull: false },
    createdAt: DataTypes.DATE,
  },
  { sequelize, underscored: true, tableName: "submission_comments", updatedAt: false },
);

Submission.hasOne(SubmissionFile, { foreignKey: "submissionId", as: "file" });
SubmissionFile.belongsTo(Submission, { foreignKey: "submissionId", as: "submission" });
Submission.belongsTo(User, { foreignKey: "submittedById", as: "submittedBy" });
Submission.hasMany(SubmissionComment, { foreignKey: "submissionId", as: "comments" });
SubmissionComment.belongsTo(User, { foreignKey: "authorId", as: "author" });

/** The effective mark: a reviewer's override, else the automatic one. */
export function effectiveMark(s: Pick<Submission, "overrideMark" | "autoMark">): number | null {
  return s.overrideMark ?? s.autoMark ?? null;
}
