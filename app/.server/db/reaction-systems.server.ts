// A course's library of reaction systems: a A + b B -> products with its rate law, the
// Arrhenius reference, what is measured and how it is calibrated, the stocks and the hazards.
import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { getSequelize } from "./sequelize.server";
import { Course } from "./models.server";

/** What the students follow in the lab; each maps onto one of the engine's measurements. */
export const MEASURED_QUANTITIES = ["concentration", "conductivity", "absorbance", "titration"] as const;
export type MeasuredQuantity = (typeof MEASURED_QUANTITIES)[number];

/**
 * Calibration by measured quantity (all optional in storage; the form asks for what applies):
 * conductivity: initial and final conductivity (mS/cm); absorbance: molar absorptivity
 * (L/(mol cm)), path length (cm), species; titration: titrant concentration (mol/L), aliquot (mL),
 * the species titrated.
 */
export interface Calibration {
  conductivityStart?: number;
  conductivityEnd?: number;
  epsilon?: number;
  pathCm?: number;
  absorbingSpecies?: "A" | "B";
  titrantMolL?: number;
  aliquotMl?: number;
  titratedSpecies?: "A" | "B";
  titrant?: string;
  /** mol of the titrated species per mol of titrant (1 when not given) */
  titrationRatio?: number;
  /** aliquots run into a known excess of a quench reagent (mol/L, mL) whose excess is titrated */
  quenchMolL?: number;
  quenchMl?: number;
  /** mol of the titrated species one mol of quench reagent takes up (1 when not given) */
  quenchRatio?: number;
}

/** A stock solution the prep room can make up. */
export interface Stock {
  species: "A" | "B";
  label: string;
  concentrationMolL: number;
}

/** Hazards of one reagent: GHS hazard statement codes (H…) and pictogram codes (GHS01–GHS09). */
export interface Hazard {
  reagent: string;
  hStatements: string[];
  pictograms: string[];
  handling: string;
}

export class ReactionSystem extends Model<InferAttributes<ReactionSystem>, InferCreationAttributes<ReactionSystem>> {
  declare id: CreationOptional<number>;
  declare courseId: ForeignKey<Course["id"]>;
  declare name: string;
  declare speciesA: string;
  declare speciesB: string;
  declare coeffA: number;
  declare coeffB: number;
  declare orderA: number;
  declare orderB: number;
  /** reference k at TrefC, per second with concentrations in mol/L; staff only */
  declare kRef: number;
  declare TrefC: number;
  /** activation energy, kJ/mol; staff only */
  declare EaKJ: number;
  declare referenceSource: CreationOptional<string>;
  declare measured: MeasuredQuantity;
  declare calibration: CreationOptional<Calibration>;
  declare stocks: CreationOptional<Stock[]>;
  declare hazards: CreationOptional<Hazard[]>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

const sequelize = getSequelize();
const dbl = (field: string) => ({ type: DataTypes.DOUBLE, allowNull: false, field });

ReactionSystem.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    speciesA: { type: DataTypes.STRING(120), allowNull: false },
    speciesB: { type: DataTypes.STRING(120), allowNull: false },
    coeffA: dbl("coeff_a"),
    coeffB: dbl("coeff_b"),
    orderA: { type: DataTypes.INTEGER, allowNull: false },
    orderB: { type: DataTypes.INTEGER, allowNull: false },
    kRef: dbl("k_ref"),
    TrefC: dbl("t_ref_c"),
    EaKJ: dbl("ea_kj"),
    referenceSource: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    measured: { type: DataTypes.STRING(30), allowNull: false },
    calibration: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    stocks: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    hazards: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, underscored: true, tableName: "reaction_systems" },
);

Course.hasMany(ReactionSystem, { foreignKey: "courseId", as: "reactionSystems" });
ReactionSystem.belongsTo(Course, { foreignKey: "courseId", as: "course" });
