// LTI 1.3 launches (1EdTech LTI Core 1.3): the platforms an admin registered, the login
// initiations in flight (state and nonce, each used once), and which platform context is which
// course and which platform person is which account.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("lti_platforms", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    issuer: { type: DataTypes.STRING(255), allowNull: false },
    client_id: { type: DataTypes.STRING(255), allowNull: false },
    /** the platform's OIDC authorisation endpoint the login initiation is answered with */
    login_url: { type: DataTypes.STRING(500), allowNull: false },
    key_set_url: { type: DataTypes.STRING(500), allowNull: false },
    /** OAuth 2 token endpoint for the grade service (client credentials) */
    token_url: { type: DataTypes.STRING(500), allowNull: true },
    deployment_ids: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    created_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL" },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("lti_platforms", ["issuer", "client_id"], { name: "lti_platforms_issuer_client", unique: true });

  await qi.createTable("lti_logins", {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    platform_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lti_platforms", key: "id" }, onDelete: "CASCADE" },
    state_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    nonce: { type: DataTypes.STRING(100), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
  });
  await qi.addIndex("lti_logins", ["created_at"], { name: "lti_logins_created_at" });

  await qi.createTable("lti_contexts", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    platform_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lti_platforms", key: "id" }, onDelete: "CASCADE" },
    context_id: { type: DataTypes.STRING(255), allowNull: false },
    course_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "courses", key: "id" }, onDelete: "CASCADE" },
    title: { type: DataTypes.STRING(255), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("lti_contexts", ["platform_id", "context_id"], { name: "lti_contexts_platform_context", unique: true });

  await qi.createTable("lti_accounts", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    platform_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lti_platforms", key: "id" }, onDelete: "CASCADE" },
    subject: { type: DataTypes.STRING(255), allowNull: false },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("lti_accounts", ["platform_id", "subject"], { name: "lti_accounts_platform_subject", unique: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("lti_accounts");
  await qi.dropTable("lti_contexts");
  await qi.dropTable("lti_logins");
  await qi.dropTable("lti_platforms");
}
