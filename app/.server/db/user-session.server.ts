// One row per signed-in browser (see db/migrations/0010-user-sessions.ts).
import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { sequelize, User } from "./models.server";

export type SessionVia = "password" | "sso" | "lti";

export class UserSession extends Model<InferAttributes<UserSession>, InferCreationAttributes<UserSession>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<User["id"]>;
  declare tokenHash: string;
  declare userAgent: string;
  declare createdAt: CreationOptional<Date>;
  declare lastSeenAt: Date;
  declare expiresAt: Date;
  declare endedAt: CreationOptional<Date | null>;
  declare endedReason: CreationOptional<string | null>;
  /** how the session was started: "password" or "sso" (the institution's sign-in) */
  declare via: CreationOptional<SessionVia>;
  declare user?: User;
}

UserSession.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    userAgent: { type: DataTypes.STRING(200), allowNull: false, defaultValue: "" },
    createdAt: DataTypes.DATE,
    lastSeenAt: { type: DataTypes.DATE, allowNull: false },
    expiresAt: { type: DataTypes.DATE, allowNull: false },
    endedAt: { type: DataTypes.DATE, allowNull: true },
    endedReason: { type: DataTypes.STRING(40), allowNull: true },
    via: { type: DataTypes.STRING(20), allowNull: false, defaultValue: "password" },
  },
  { sequelize, underscored: true, tableName: "user_sessions", updatedAt: false },
);

UserSession.belongsTo(User, { foreignKey: "userId", as: "user" });
User.hasMany(UserSession, { foreignKey: "userId", as: "sessions" });
