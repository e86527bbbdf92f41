// Lab sessions ("practicals") and their benches. Each bench has its own feed (CA0, CB0) and
// temperature, unique within the session, and at most one group.
import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { getSequelize } from "./sequelize.server";
import { Course } from "./models.server";
import { Group } from "./groups.server";
import { ReactionSystem } from "./reaction-systems.server";
import { DEFAULT_RUBRIC as MARKING_DEFAULT, type MarkingRubric } from "~/lib/marking/rubric";

export const SESSION_STATUSES = ["draft", "planned", "notified", "closed"] as const;
export type SessionStatus = (typeof SESSION_STATUSES)[number];

/**
 * Marking rubric (staff only), stored flat as the planning form writes it. The experiment check
 * (marking k against the reference at the bench's temperature) uses fullWithinPct,
 * partialWithinPct and partialFraction; the analysis check (the group's reported k against their
 * own straight line) the analysis* bands. experimentWeight + analysisWeight = 1. Late work loses
 * latePenaltyPct; each slip a reviewer corrected costs correctionCostPct of the mark.
 * `rubricFrom` (app/lib/marking/rubric.ts) reads it; older rubrics without the analysis bands or
 * the correction cost take the marking defaults.
 */
export interface Rubric {
  fullWithinPct: number;
  partialWithinPct: number;
  partialFraction: number;
  analysisWeight: number;
  experimentWeight: number;
  latePenaltyPct: number;
  analysisFullWithinPct?: number;
  analysisPartialWithinPct?: number;
  analysisPartialFraction?: number;
  correctionCostPct?: number;
}

/** The marking defaults (60/40 experiment/analysis) in the stored shape: one set of defaults. */
export const DEFAULT_RUBRIC: Rubric = storedRubric(MARKING_DEFAULT);

/** A marking rubric in the stored (flat) shape, weights as shares of 1. */
export function storedRubric(r: MarkingRubric): Rubric {
  const total = r.experiment.weight + r.analysis.weight;
  const analysisWeight = total > 0 ? Number((r.analysis.weight / total).toFixed(6)) : 0.5;
  return {
    fullWithinPct: r.experiment.fullWithinPct,
    partialWithinPct: r.experiment.partialWithinPct,
    partialFraction: r.experiment.partialFraction,
    analysisWeight,
    experimentWeight: Number((1 - analysisWeight).toFixed(6)),
    latePenaltyPct: r.latePenaltyPct,
    analysisFullWithinPct: r.analysis.fullWithinPct,
    analysisPartialWithinPct: r.analysis.partialWithinPct,
    analysisPartialFraction: r.analysis.partialFraction,
    correctionCostPct: r.correctionCostPct,
  };
}

export class LabSession extends Model<InferAttributes<LabSession>, InferCreationAttributes<LabSession>> {
  declare id: CreationOptional<number>;
  declare courseId: ForeignKey<Course["id"]>;
  declare reactionSystemId: ForeignKey<ReactionSystem["id"]>;
  declare title: string;
  /** the lab day, YYYY-MM-DD */
  declare date: string;
  declare slotMinutes: number;
  declare setupMinutes: number;
  declare reactorVolumeMl: number;
  /** stock solution concentrations, mol/L */
  declare stockAMolL: number;
  declare stockBMolL: number;
  declare samplingIntervalS: number;
  /** conversion of the limiting reagent each bench should reach, 0-1 */
  declare targetConversion: CreationOptional<number>;
  declare rubric: Rubric;
  /** uploads after this are late */
  declare deadline: Date | null;
  declare status: CreationOptional<SessionStatus>;
  declare notifiedAt: CreationOptional<Date | null>;
  declare marksReleasedAt: CreationOptional<Date | null>;
  /** weight of this practical's mark in the course total (0 leaves it out) */
  declare gradeWeight: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare benches?: Bench[];
  declare reactionSystem?: ReactionSystem;
}

export class Bench extends Model<InferAttributes<Bench>, InferCreationAttributes<Bench>> {
  declare id: CreationOptional<number>;
  declare sessionId: ForeignKey<LabSession["id"]>;
  declare position: number;
  declare label: string;
  /** initial concentrations in the reactor, mol/L */
  declare CA0: number;
  declare CB0: number;
  declare temperatureC: number;
  declare groupId: ForeignKey<Group["id"]> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare group?: Group | null;
  declare session?: LabSession;
}

const sequelize = getSequelize();

LabSession.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    title: { type: DataTypes.STRING(160), allowNull: false },
    date: { type: DataTypes.DATEONLY, allowNull: false },
    slotMinutes: { type: DataTypes.INTEGER, allowNull: false },
    setupMinutes: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    reactorVolumeMl: { type: DataTypes.DOUBLE, allowNull: false, field: "reactor_volume_ml" },
    stockAMolL: { type: DataTypes.DOUBLE, allowNull: false, field: "stock_a_mol_l" },
    stockBMolL: { type: DataTypes.DOUBLE, allowNull: false, field: "stock_b_mol_l" },
    samplingIntervalS: { type: DataTypes.INTEGER, allowNull: false, field: "sampling_interval_s" },
    targetConversion: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0.8 },
    rubric: { type: DataTypes.JSONB, allowNull: false },
    deadline: { type: DataTypes.DATE, allowNull: true },
    status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: "draft" },
    notifiedAt: { type: DataTypes.DATE, allowNull: true },
    marksReleasedAt: { type: DataTypes.DATE, allowNull: true },
    gradeWeight: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, underscored: true, tableName: "lab_sessions" },
);

Bench.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    position: { type: DataTypes.INTEGER, allowNull: false },
    label: { type: DataTypes.STRING(20), allowNull: false },
    CA0: { type: DataTypes.DOUBLE, allowNull: false, field: "ca0" },
    CB0: { type: DataTypes.DOUBLE, allowNull: false, field: "cb0" },
    temperatureC: { type: DataTypes.DOUBLE, allowNull: false, field: "temperature_c" },
    groupId: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, underscored: true, tableName: "benches" },
);

Course.hasMany(LabSession, { foreignKey: "courseId", as: "labSessions" });
LabSession.belongsTo(Course, { foreignKey: "courseId", as: "course" });
LabSession.belongsTo(ReactionSystem, { foreignKey: "reactionSystemId", as: "reactionSystem" });
ReactionSystem.hasMany(LabSession, { foreignKey: "reactionSystemId", as: "labSessions" });
LabSession.hasMany(Bench, { foreignKey: "sessionId", as: "benches" });
Bench.belongsTo(LabSession, { foreignKey: "sessionId", as: "session" });
Bench.belongsTo(Group, { foreignKey: "groupId", as: "group" });
Group.hasMany(Bench, { foreignKey: "groupId", as: "benches" });
