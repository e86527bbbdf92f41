// Benches an instructor leaves out of a practical's pooled Arrhenius fit (schema: 0022).
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { getSequelize } from "./sequelize.server";
import { User } from "./models.server";

export class ClassFitExclusion extends Model<InferAttributes<ClassFitExclusion>, InferCreationAttributes<ClassFitExclusion>> {
  declare id: CreationOptional<number>;
  declare sessionId: number;
  declare benchId: number;
  declare reason: string;
  declare excludedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare excludedBy?: User | null;
}

ClassFitExclusion.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    sessionId: { type: DataTypes.INTEGER, allowNull: false },
    benchId: { type: DataTypes.INTEGER, allowNull: false },
    reason: { type: DataTypes.TEXT, allowNull: false },
    excludedById: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
  },
  { sequelize: getSequelize(), underscored: true, tableName: "class_fit_exclusions", updatedAt: false },
);

ClassFitExclusion.belongsTo(User, { foreignKey: "excludedById", as: "excludedBy" });
