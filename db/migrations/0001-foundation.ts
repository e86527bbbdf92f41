// Foundation tables: people, courses, who takes part in which course, one-time tokens,
// sign-in attempts (for throttling) and the audit log.
import { DataTypes, type QueryInterface } from "sequelize";

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("users", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    password_hash: { type: DataTypes.STRING(100), allowNull: true },
    role: { type: DataTypes.STRING(20), allowNull: false },
    display_name: { type: DataTypes.STRING(120), allowNull: false },
    ...timestamps,
  });
  await qi.sequelize.query(
    "alter table users add constraint users_role_check check (role in ('admin','instructor','demonstrator','student'))," +
      " add constraint users_email_lower check (email = lower(email))",
  );

  await qi.createTable("courses", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    code: { type: DataTypes.STRING(40), allowNull: false, unique: true },
    title: { type: DataTypes.STRING(200), allowNull: false },
    term: { type: DataTypes.STRING(60), allowNull: false, defaultValue: "" },
    ...timestamps,
  });

  await qi.createTable("course_memberships", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    course_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "courses", key: "id" }, onDelete: "CASCADE" },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    role: { type: DataTypes.STRING(20), allowNull: false },
    ...timestamps,
  });
  await qi.addIndex("course_memberships", ["course_id", "user_id"], { unique: true });
  await qi.addIndex("course_memberships", ["user_id"]);
  await qi.sequelize.query(
    "alter table course_memberships add constraint course_memberships_role_check check (role in ('instructor','demonstrator','student'))",
  );

  await qi.createTable("auth_tokens", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    purpose: { type: DataTypes.STRING(20), allowNull: false },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
    created_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL" },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.sequelize.query(
    "alter table auth_tokens add constraint auth_tokens_purpose_check check (purpose in ('invitation','password-reset'))",
  );

  await qi.createTable("sign_in_attempts", {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false },
    ip: { type: DataTypes.STRING(64), allowNull: false },
    succeeded: { type: DataTypes.BOOLEAN, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("sign_in_attempts", ["email", "created_at"]);
  await qi.addIndex("sign_in_attempts", ["ip", "created_at"]);

  await qi.createTable("audit_log", {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    actor_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL" },
    action: { type: DataTypes.STRING(80), allowNull: false },
    entity_type: { type: DataTypes.STRING(60), allowNull: false },
    entity_id: { type: DataTypes.STRING(60), allowNull: true },
    before: { type: DataTypes.JSONB, allowNull: true },
    after: { type: DataTypes.JSONB, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("audit_log", ["entity_type", "entity_id"]);
  await qi.addIndex("audit_log", ["created_at"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const t of ["audit_log", "sign_in_attempts", "auth_tokens", "course_memberships", "courses", "users"]) {
    await qi.dropTable(t, {});
  }
}
