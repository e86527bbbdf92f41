// Class results: benches an instructor leaves out of a practical's pooled Arrhenius fit, each with
// its reason, who and when. Putting a bench back deletes its row; both are in the audit log.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("class_fit_exclusions", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    session_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "lab_sessions", key: "id" }, onDelete: "CASCADE" },
    bench_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "benches", key: "id" }, onDelete: "CASCADE" },
    reason: { type: DataTypes.TEXT, allowNull: false },
    excluded_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL" },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("class_fit_exclusions", ["session_id", "bench_id"], { unique: true, name: "class_fit_exclusions_session_bench" });
  await qi.sequelize.query("alter table class_fit_exclusions add constraint class_fit_exclusions_reason_check check (length(btrim(reason)) between 1 and 500)");
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("class_fit_exclusions", {});
}
