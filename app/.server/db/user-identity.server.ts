// An institution identity linked to an account (db/migrations/0040-sso-identities.ts).
import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { sequelize, User } from "./models.server";

export class UserIdentity extends Model<InferAttributes<UserIdentity>, InferCreationAttributes<UserIdentity>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<User["id"]>;
  declare issuer: string;
  declare subject: string;
  declare linkedBy: "email" | "institution-id";
  declare email: string | null;
  declare createdAt: CreationOptional<Date>;
  declare lastUsedAt: Date;
}

UserIdentity.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    issuer: { type: DataTypes.STRING(255), allowNull: false },
    subject: { type: DataTypes.STRING(255), allowNull: false },
    linkedBy: { type: DataTypes.STRING(20), allowNull: false },
    email: { type: DataTypes.STRING(254), allowNull: true },
    createdAt: DataTypes.DATE,
    lastUsedAt: { type: DataTypes.DATE, allowNull: false },
  },
  { sequelize, underscored: true, tableName: "user_identities", updatedAt: false },
);

UserIdentity.belongsTo(User, { foreignKey: "userId", as: "user" });
User.hasMany(UserIdentity, { foreignKey: "userId", as: "identities" });
