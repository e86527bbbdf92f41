// LTI Assignment and Grade Services (1EdTech AGS 2.0): where a platform course takes scores (the
// launch's endpoint claim), the line item made for each practical, each student's score as last
// sent, and the tool's own signing keys (for the OAuth 2 client assertion, published at /lti/jwks).
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("lti_contexts", "lineitems_url", { type: DataTypes.STRING(500), allowNull: true });
  await qi.addColumn("lti_contexts", "ags_scopes", { type: DataTypes.JSONB, allowNull: false, defaultValue: [] });

  await qi.createTable("lti_tool_keys", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    kid: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    private_jwk: { type: DataTypes.JSONB, allowNull: false },
    public_jwk: { type: DataTypes.JSONB, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });

  await qi.createTable("lti_line_items", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    lti_context_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lti_contexts", key: "id" }, onDelete: "CASCADE" },
    session_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lab_sessions", key: "id" }, onDelete: "CASCADE" },
    url: { type: DataTypes.STRING(500), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("lti_line_items", ["lti_context_id", "session_id"], { name: "lti_line_items_context_session", unique: true });

  await qi.createTable("lti_scores", {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    lti_context_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lti_contexts", key: "id" }, onDelete: "CASCADE" },
    session_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lab_sessions", key: "id" }, onDelete: "CASCADE" },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    /** the mark (0-100) to send; sent_mark is what the platform holds */
    mark: { type: DataTypes.DOUBLE, allowNull: false },
    sent_mark: { type: DataTypes.DOUBLE, allowNull: true },
    /** waiting (to send or being retried), sent, failed (attempts used up) */
    state: { type: DataTypes.STRING(16), allowNull: false },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    last_error: { type: DataTypes.TEXT, allowNull: true },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("lti_scores", ["lti_context_id", "session_id", "user_id"], { name: "lti_scores_context_session_user", unique: true });
  await qi.addIndex("lti_scores", ["session_id"], { name: "lti_scores_session" });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("lti_scores");
  await qi.dropTable("lti_line_items");
  await qi.dropTable("lti_tool_keys");
  await qi.removeColumn("lti_contexts", "ags_scopes");
  await qi.removeColumn("lti_contexts", "lineitems_url");
}
