// Course invitations for people who already have an account: a roster import no longer enrols
// (or renames) an existing person; it invites them, and they join when they accept.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("course_invitations", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    course_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "courses", key: "id" }, onDelete: "CASCADE" },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: "users", key: "id" }, onDelete: "CASCADE" },
    role: { type: DataTypes.STRING(20), allowNull: false },
    /** what the roster said, applied on acceptance */
    student_number: { type: DataTypes.STRING(40), allowNull: true },
    group_name: { type: DataTypes.STRING(80), allowNull: true },
    invited_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL" },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("course_invitations", ["course_id", "user_id"], { unique: true, name: "course_invitations_course_user" });
  await qi.addIndex("course_invitations", ["user_id"], { name: "course_invitations_user_id" });
  await qi.sequelize.query("alter table course_invitations add constraint course_invitations_role_check check (role in ('student', 'demonstrator', 'instructor'))");
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("course_invitations", {});
}
