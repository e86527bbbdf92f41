// A reviewer's stated corrections of a version (a unit, the columns, a reading left out): kept
// with the version so every re-mark applies and prices them again, and the group is told.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("submissions", "corrections", { type: DataTypes.JSONB, allowNull: false, defaultValue: [] });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn("submissions", "corrections");
}
