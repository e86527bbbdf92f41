// A standing invitation of an existing account to a course (migration 0051). It grants nothing:
// the person becomes a member only when they accept it on their dashboard.
import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { getSequelize } from "./sequelize.server";
import { Course, User, type CourseRole } from "./models.server";

export class CourseInvitation extends Model<InferAttributes<CourseInvitation>, InferCreationAttributes<CourseInvitation>> {
  declare id: CreationOptional<number>;
  declare courseId: ForeignKey<Course["id"]>;
  declare userId: ForeignKey<User["id"]>;
  declare role: CourseRole;
  declare studentNumber: string | null;
  declare groupName: string | null;
  declare invitedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare course?: Course;
  declare user?: User;
}

CourseInvitation.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    role: { type: DataTypes.STRING(20), allowNull: false },
    studentNumber: { type: DataTypes.STRING(40), allowNull: true },
    groupName: { type: DataTypes.STRING(80), allowNull: true },
    invitedById: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize: getSequelize(), underscored: true, tableName: "course_invitations" },
);

CourseInvitation.belongsTo(Course, { foreignKey: "courseId", as: "course" });
CourseInvitation.belongsTo(User, { foreignKey: "userId", as: "user" });
Course.hasMany(CourseInvitation, { foreignKey: "courseId", as: "invitations" });
