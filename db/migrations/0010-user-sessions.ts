// Server-side sessions: the cookie carries only a random token; this table holds its SHA-256,
// so a session can be listed and ended (sign-out, password change or reset, role removal).
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("user_sessions", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    user_agent: { type: DataTypes.STRING(200), allowNull: false, defaultValue: "" },
    created_at: { type: DataTypes.DATE, allowNull: false },
    last_seen_at: { type: DataTypes.DATE, allowNull: false },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    ended_at: { type: DataTypes.DATE, allowNull: true },
    ended_reason: { type: DataTypes.STRING(40), allowNull: true },
  });
  await qi.addIndex("user_sessions", ["user_id"], { name: "user_sessions_user_id" });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("user_sessions");
}
