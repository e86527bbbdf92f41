// Gradebook settings: each practical's weight in the course total, whether missing work counts as
// zero, and each person's remembered table view (column choice, sort, filters) per table.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("lab_sessions", "grade_weight", { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 });
  await qi.sequelize.query("alter table lab_sessions add constraint lab_sessions_grade_weight_check check (grade_weight >= 0 and grade_weight <= 1000)");
  await qi.addColumn("courses", "missing_counts_as_zero", { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });
  await qi.createTable("table_views", {
    user_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    table_key: { type: DataTypes.STRING(80), allowNull: false, primaryKey: true },
    settings: { type: DataTypes.JSONB, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("table_views", {});
  await qi.removeColumn("courses", "missing_counts_as_zero");
  await qi.sequelize.query("alter table lab_sessions drop constraint if exists lab_sessions_grade_weight_check");
  await qi.removeColumn("lab_sessions", "grade_weight");
}
