// LTI 1.3 registrations and mappings (db/migrations/0050-lti-launch.ts). lti_logins is used
// through plain SQL only (app/.server/lti/launch.server.ts); so are lti_tool_keys, lti_line_items and
// lti_scores (db/migrations/0056-lti-grades.ts, app/.server/lti/grades.server.ts).
import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { Course, sequelize, User } from "./models.server";

export class LtiPlatform extends Model<InferAttributes<LtiPlatform>, InferCreationAttributes<LtiPlatform>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare issuer: string;
  declare clientId: string;
  declare loginUrl: string;
  declare keySetUrl: string;
  declare tokenUrl: string | null;
  declare deploymentIds: string[];
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class LtiContext extends Model<InferAttributes<LtiContext>, InferCreationAttributes<LtiContext>> {
  declare id: CreationOptional<number>;
  declare platformId: ForeignKey<LtiPlatform["id"]>;
  declare contextId: string;
  declare courseId: ForeignKey<Course["id"]>;
  declare title: string | null;
  /** AGS line item container of the platform course (the launch's endpoint claim), null when it takes no scores */
  declare lineitemsUrl: CreationOptional<string | null>;
  declare agsScopes: CreationOptional<string[]>;
  declare createdAt: CreationOptional<Date>;
}

export class LtiAccount extends Model<InferAttributes<LtiAccount>, InferCreationAttributes<LtiAccount>> {
  declare id: CreationOptional<number>;
  declare platformId: ForeignKey<LtiPlatform["id"]>;
  declare subject: string;
  declare userId: ForeignKey<User["id"]>;
  declare createdAt: CreationOptional<Date>;
}

const common = { sequelize, underscored: true } as const;

LtiPlatform.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    issuer: { type: DataTypes.STRING(255), allowNull: false },
    clientId: { type: DataTypes.STRING(255), allowNull: false },
    loginUrl: { type: DataTypes.STRING(500), allowNull: false },
    keySetUrl: { type: DataTypes.STRING(500), allowNull: false },
    tokenUrl: { type: DataTypes.STRING(500), allowNull: true },
    deploymentIds: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    createdById: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { ...common, tableName: "lti_platforms" },
);

LtiContext.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    contextId: { type: DataTypes.STRING(255), allowNull: false },
    title: { type: DataTypes.STRING(255), allowNull: true },
    lineitemsUrl: { type: DataTypes.STRING(500), allowNull: true },
    agsScopes: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    createdAt: DataTypes.DATE,
  },
  { ...common, tableName: "lti_contexts", updatedAt: false },
);

LtiAccount.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    subject: { type: DataTypes.STRING(255), allowNull: false },
    createdAt: DataTypes.DATE,
  },
  { ...common, tableName: "lti_accounts", updatedAt: false },
);

LtiContext.belongsTo(LtiPlatform, { foreignKey: "platformId", as: "platform" });
LtiContext.belongsTo(Course, { foreignKey: "courseId", as: "course" });
LtiAccount.belongsTo(LtiPlatform, { foreignKey: "platformId", as: "platform" });
LtiAccount.belongsTo(User, { foreignKey: "userId", as: "user" });
