// A course's time zone (IANA name): deadlines are entered and shown on the lab's wall clock and
// stored in UTC. Existing courses keep UTC, which is what their deadlines were entered in.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("courses", "time_zone", { type: DataTypes.STRING(64), allowNull: false, defaultValue: "UTC" });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn("courses", "time_zone");
}
