// Personal API tokens (see db/migrations/0020-api-tokens.ts).
import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { sequelize, User } from "./models.server";

export class ApiToken extends Model<InferAttributes<ApiToken>, InferCreationAttributes<ApiToken>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<User["id"]>;
  declare name: string;
  declare tokenHash: string;
  declare tokenStart: string;
  declare createdAt: CreationOptional<Date>;
  declare expiresAt: Date | null;
  declare lastUsedAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
}

ApiToken.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(80), allowNull: false },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    tokenStart: { type: DataTypes.STRING(12), allowNull: false },
    createdAt: DataTypes.DATE,
    expiresAt: { type: DataTypes.DATE, allowNull: true },
    lastUsedAt: { type: DataTypes.DATE, allowNull: true },
    revokedAt: { type: DataTypes.DATE, allowNull: true },
  },
  { sequelize, underscored: true, tableName: "api_tokens", updatedAt: false },
);

ApiToken.belongsTo(User, { foreignKey: "userId", as: "user" });
