// Uploads and marking: one row per submitted version of a group's readings, the original file
// byte for byte in its own table (written in the same transaction), reviewers' comments, and
// whether a practical's release shows students the reference value.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await qi.createTable("submissions", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    group_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "groups", key: "id" }, onDelete: "CASCADE" },
    session_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lab_sessions", key: "id" }, onDelete: "CASCADE" },
    bench_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "benches", key: "id" }, onDelete: "SET NULL" },
    version: { type: DataTypes.INTEGER, allowNull: false },
    submitted_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL" },
    submitted_at: { type: DataTypes.DATE, allowNull: false },
    late: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    status: { type: DataTypes.STRING(20), allowNull: false },
    // what the group told us about the file
    time_column: { type: DataTypes.STRING(200), allowNull: true },
    value_column: { type: DataTypes.STRING(200), allowNull: true },
    measured: { type: DataTypes.STRING(30), allowNull: false },
    time_unit: { type: DataTypes.STRING(10), allowNull: false },
    concentration_unit: { type: DataTypes.STRING(10), allowNull: false },
    reported_k: { type: DataTypes.DOUBLE, allowNull: true },
    reported_method: { type: DataTypes.STRING(60), allowNull: true },
    // what we read from it: [{ row, column, message }], and { points, rowNumbers, time, value, notes }
    problems: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    readings: { type: DataTypes.JSONB, allowNull: true },
    // the marking job's result
    fit: { type: DataTypes.JSONB, allowNull: true },
    flags: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    feedback: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    checks: { type: DataTypes.JSONB, allowNull: true },
    experiment_part: { type: DataTypes.DOUBLE, allowNull: true },
    analysis_part: { type: DataTypes.DOUBLE, allowNull: true },
    late_penalty: { type: DataTypes.DOUBLE, allowNull: true },
    auto_mark: { type: DataTypes.DOUBLE, allowNull: true },
    override_mark: { type: DataTypes.DOUBLE, allowNull: true },
    override_reason: { type: DataTypes.TEXT, allowNull: true },
    excluded: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    marked_at: { type: DataTypes.DATE, allowNull: true },
    marking_runs: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    marking_error: { type: DataTypes.TEXT, allowNull: true },
    review_state: { type: DataTypes.STRING(20), allowNull: false, defaultValue: "to-check" },
    reviewed_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL" },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("submissions", ["group_id", "session_id", "version"], { unique: true, name: "submissions_group_version" });
  await qi.addIndex("submissions", ["session_id", "group_id"], { name: "submissions_session_group" });
  await sql(
    "alter table submissions add constraint submissions_checks check (" +
      "version > 0 and status in ('queued','marked','refused','failed') and review_state in ('to-check','checked')" +
      " and (override_mark is null or (override_mark between 0 and 100 and override_reason is not null and length(override_reason) > 0))" +
      " and (auto_mark is null or auto_mark between 0 and 100))",
  );

  await qi.createTable("submission_files", {
    submission_id: { type: DataTypes.INTEGER, primaryKey: true, references: { model: "submissions", key: "id" }, onDelete: "CASCADE" },
    bytes: { type: DataTypes.BLOB, allowNull: false },
    size: { type: DataTypes.INTEGER, allowNull: false },
    sha256: { type: DataTypes.STRING(64), allowNull: false },
    content_type: { type: DataTypes.STRING(100), allowNull: false },
    original_name: { type: DataTypes.STRING(255), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await sql("alter table submission_files add constraint submission_files_size check (size = octet_length(bytes) and length(sha256) = 64)");

  await qi.createTable("submission_comments", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    submission_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "submissions", key: "id" }, onDelete: "CASCADE" },
    author_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL" },
    body: { type: DataTypes.TEXT, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("submission_comments", ["submission_id"], { name: "submission_comments_submission" });

  await qi.addColumn("lab_sessions", "release_shows_reference", { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn("lab_sessions", "release_shows_reference");
  for (const t of ["submission_comments", "submission_files", "submissions"]) await qi.dropTable(t, {});
}
