// Groups of students in a course (the unit that works at one bench and submits together).
import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { getSequelize } from "./sequelize.server";
import { Course, User } from "./models.server";

export class Group extends Model<InferAttributes<Group>, InferCreationAttributes<Group>> {
  declare id: CreationOptional<number>;
  declare courseId: ForeignKey<Course["id"]>;
  declare name: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare members?: GroupMember[];
}

/** One student in one group; course_id repeats the group's so a student has one group per course. */
export class GroupMember extends Model<InferAttributes<GroupMember>, InferCreationAttributes<GroupMember>> {
  declare id: CreationOptional<number>;
  declare groupId: ForeignKey<Group["id"]>;
  declare courseId: number;
  declare userId: ForeignKey<User["id"]>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare user?: User;
  declare group?: Group;
}

const sequelize = getSequelize();

Group.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(80), allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, underscored: true, tableName: "groups" },
);

GroupMember.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    courseId: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, underscored: true, tableName: "group_members" },
);

Course.hasMany(Group, { foreignKey: "courseId", as: "groups" });
Group.belongsTo(Course, { foreignKey: "courseId", as: "course" });
Group.hasMany(GroupMember, { foreignKey: "groupId", as: "members" });
GroupMember.belongsTo(Group, { foreignKey: "groupId", as: "group" });
GroupMember.belongsTo(User, { foreignKey: "userId", as: "user" });
User.hasMany(GroupMember, { foreignKey: "userId", as: "groupMemberships" });
