// Sequelize models for the foundation tables. The schema itself is owned by db/migrations/;
// these definitions must match it (tests run the migrations, then use the models).
import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
} from "sequelize";
import { getSequelize } from "./sequelize.server";

/**
 * Account-level roles. They say what a person may do outside any course; inside a course, the
 * course role (COURSE_ROLES) decides. Named so they do not read as course roles.
 */
export const ROLES = ["admin", "course-creator", "member"] as const;
export type Role = (typeof ROLES)[number];
export const ROLE_LABELS: Record<Role, string> = { admin: "administrator", "course-creator": "course creator", member: "member" };
export const COURSE_ROLES = ["instructor", "demonstrator", "student"] as const;
export type CourseRole = (typeof COURSE_ROLES)[number];
export const TOKEN_PURPOSES = ["invitation", "password-reset"] as const;
export type TokenPurpose = (typeof TOKEN_PURPOSES)[number];

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare passwordHash: string | null;
  declare role: Role;
  declare displayName: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Course extends Model<InferAttributes<Course>, InferCreationAttributes<Course>> {
  declare id: CreationOptional<number>;
  declare code: string;
  declare title: string;
  declare term: string;
  declare archivedAt: CreationOptional<Date | null>;
  /** gradebook: a practical with no mark counts 0 in the total (else it is left out of it) */
  declare missingCountsAsZero: CreationOptional<boolean>;
  /** students must sign in through the institution's single sign-on (staff may still use a password) */
  declare ssoRequired: CreationOptional<boolean>;
  /** IANA zone of the lab's wall clock (deadlines are entered and shown in it) */
  declare timeZone: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class CourseMembership extends Model<
  InferAttributes<CourseMembership>,
  InferCreationAttributes<CourseMembership>
> {
  declare id: CreationOptional<number>;
  declare courseId: ForeignKey<Course["id"]>;
  declare userId: ForeignKey<User["id"]>;
  declare role: CourseRole;
  /** the institution's student ID from the roster (students only) */
  declare studentNumber: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare user?: User;
  declare course?: Course;
}

export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  declare id: CreationOptional<number>;
  declare actorId: number | null;
  declare action: string;
  declare entityType: string;
  declare entityId: string | null;
  declare before: unknown;
  declare after: unknown;
  declare createdAt: CreationOptional<Date>;
  declare actor?: User | null;
}

export class AuthToken extends Model<InferAttributes<AuthToken>, InferCreationAttributes<AuthToken>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<User["id"]>;
  declare purpose: TokenPurpose;
  declare tokenHash: string;
  declare expiresAt: Date;
  declare usedAt: CreationOptional<Date | null>;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare user?: User;
}

export class SignInAttempt extends Model<InferAttributes<SignInAttempt>, InferCreationAttributes<SignInAttempt>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare ip: string;
  declare succeeded: boolean;
  declare createdAt: CreationOptional<Date>;
}

const sequelize = getSequelize();
const common = { sequelize, underscored: true } as const;

User.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    passwordHash: { type: DataTypes.STRING(100), allowNull: true },
    role: { type: DataTypes.STRING(20), allowNull: false, validate: { isIn: [ROLES as unknown as string[]] } },
    displayName: { type: DataTypes.STRING(120), allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { ...common, tableName: "users" },
);

Course.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    code: { type: DataTypes.STRING(40), allowNull: false },
    title: { type: DataTypes.STRING(200), allowNull: false },
    term: { type: DataTypes.STRING(60), allowNull: false, defaultValue: "" },
    archivedAt: { type: DataTypes.DATE, allowNull: true },
    missingCountsAsZero: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ssoRequired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    timeZone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: "UTC" },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { ...common, tableName: "courses" },
);

CourseMembership.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    role: { type: DataTypes.STRING(20), allowNull: false, validate: { isIn: [COURSE_ROLES as unknown as string[]] } },
    studentNumber: { type: DataTypes.STRING(40), allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { ...common, tableName: "course_memberships" },
);

AuditEntry.init(
  {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    actorId: { type: DataTypes.INTEGER, allowNull: true },
    action: { type: DataTypes.STRING(80), allowNull: false },
    entityType: { type: DataTypes.STRING(60), allowNull: false },
    entityId: { type: DataTypes.STRING(60), allowNull: true },
    before: { type: DataTypes.JSONB, allowNull: true },
    after: { type: DataTypes.JSONB, allowNull: true },
    createdAt: DataTypes.DATE,
  },
  { ...common, tableName: "audit_log", updatedAt: false },
);

AuthToken.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    purpose: { type: DataTypes.STRING(20), allowNull: false },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    expiresAt: { type: DataTypes.DATE, allowNull: false },
    usedAt: { type: DataTypes.DATE, allowNull: true },
    createdById: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
  },
  { ...common, tableName: "auth_tokens", updatedAt: false },
);

SignInAttempt.init(
  {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false },
    ip: { type: DataTypes.STRING(64), allowNull: false },
    succeeded: { type: DataTypes.BOOLEAN, allowNull: false },
    createdAt: DataTypes.DATE,
  },
  { ...common, tableName: "sign_in_attempts", updatedAt: false },
);

Course.hasMany(CourseMembership, { foreignKey: "courseId", as: "memberships" });
CourseMembership.belongsTo(Course, { foreignKey: "courseId", as: "course" });
User.hasMany(CourseMembership, { foreignKey: "userId", as: "memberships" });
CourseMembership.belongsTo(User, { foreignKey: "userId", as: "user" });
AuthToken.belongsTo(User, { foreignKey: "userId", as: "user" });
AuditEntry.belongsTo(User, { foreignKey: "actorId", as: "actor" });

export { sequelize };
