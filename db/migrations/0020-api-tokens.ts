// Personal API tokens: a person names a token, sees it once, and uses it as
// `Authorization: Bearer` on the JSON API. Only its SHA-256 is kept.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("api_tokens", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    name: { type: DataTypes.STRING(80), allowNull: false },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    /** the first characters of the token, so its owner can tell tokens apart */
    token_start: { type: DataTypes.STRING(12), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    expires_at: { type: DataTypes.DATE, allowNull: true },
    last_used_at: { type: DataTypes.DATE, allowNull: true },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
  });
  await qi.addIndex("api_tokens", ["user_id"], { name: "api_tokens_user_id" });
  await qi.sequelize.query("alter table api_tokens add constraint api_tokens_name_check check (length(btrim(name)) between 1 and 80)");
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("api_tokens", {});
}
