// Single sign-on (OpenID Connect): which institution identity belongs to which account, a
// course's "students sign in with the institution" switch, and how each session was started
// (so turning the switch on can end the password sessions it no longer allows).
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("user_identities", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    // The provider's issuer URL and its stable subject id: together they name one person (OpenID Connect Core 1.0, 5.7).
    issuer: { type: DataTypes.STRING(255), allowNull: false },
    subject: { type: DataTypes.STRING(255), allowNull: false },
    /** how the first sign-in was matched to the account: "email" or "institution-id" */
    linked_by: { type: DataTypes.STRING(20), allowNull: false },
    /** the e-mail the provider gave at linking time (for the audit and the account page) */
    email: { type: DataTypes.STRING(254), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    last_used_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("user_identities", ["issuer", "subject"], { name: "user_identities_issuer_subject", unique: true });
  await qi.addIndex("user_identities", ["user_id"], { name: "user_identities_user_id" });
  await qi.addColumn("courses", "sso_required", { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });
  await qi.addColumn("user_sessions", "via", { type: DataTypes.STRING(20), allowNull: false, defaultValue: "password" });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn("user_sessions", "via");
  await qi.removeColumn("courses", "sso_required");
  await qi.dropTable("user_identities");
}
