// Demo data: an invented scenario (a made-up course, made-up people, .invalid e-mail domains).
// Safe to run again: it only adds what is missing.
import { Course, CourseMembership, User, sequelize, type CourseRole, type Role } from "../../app/.server/db/models.server";
import { hashPassword } from "../../app/.server/passwords.server";
import { recordAudit } from "../../app/.server/audit.server";
import { seedPlanningDemo } from "./planning-demo";

export interface DemoSignIn {
  /** which demo person this is (named by what they do in the demo course) */
  role: "admin" | "instructor" | "demonstrator" | "student";
  /** account-level role */
  accountRole: Role;
  /** role in the demo course (the admin is not a member) */
  courseRole: CourseRole | null;
  email: string;
  password: string;
  name: string;
}

export const DEMO_SIGN_INS: DemoSignIn[] = [
  { role: "admin", accountRole: "admin", courseRole: null, email: "admin@demo.ratebook.invalid", password: "demo-admin-pass", name: "Morgan Reyes (demo admin)" },
  { role: "instructor", accountRole: "course-creator", courseRole: "instructor", email: "instructor@demo.ratebook.invalid", password: "demo-instructor-pass", name: "Dr Rowan Vale (demo instructor)" },
  { role: "demonstrator", accountRole: "member", courseRole: "demonstrator", email: "demonstrator@demo.ratebook.invalid", password: "demo-demonstrator-pass", name: "Kit Okafor (demo demonstrator)" },
  { role: "student", accountRole: "member", courseRole: "student", email: "student@demo.ratebook.invalid", password: "demo-student-pass", name: "Sam Lindqvist (demo student)" },
];

const DEMO_COURSE = { code: "KIN-DEMO", title: "Reaction kinetics practicals (invented demo course)", term: "Demo term" };
const EXTRA_STUDENTS = ["Ari Novak", "Bea Tanaka", "Cam Osei", "Dee Laurent", "Eli Moreau", "Fen Hadley", "Gus Ivanova", "Hal Brandt"];

export async function seedDemo(): Promise<DemoSignIn[]> {
  await sequelize.transaction(async (transaction) => {
    const [course, courseCreated] = await Course.findOrCreate({ where: { code: DEMO_COURSE.code, term: DEMO_COURSE.term }, defaults: DEMO_COURSE, transaction });
    if (courseCreated) await recordAudit({ actorId: null, action: "course.created", entityType: "course", entityId: course.id, after: DEMO_COURSE }, transaction);
    const people: Array<{ email: string; name: string; role: Role; password: string | null; courseRole: CourseRole | null }> = [
      ...DEMO_SIGN_INS.map((d) => ({ email: d.email, name: d.name, role: d.accountRole, password: d.password, courseRole: d.courseRole })),
      ...EXTRA_STUDENTS.map((n, i) => ({
        email: `student${i + 2}@demo.ratebook.invalid`,
        name: `${n} (demo student)`,
        role: "member" as Role,
        password: "demo-student-pass",
        courseRole: "student" as CourseRole,
      })),
    ];
    for (const p of people) {
      let user = await User.findOne({ where: { email: p.email }, transaction });
      if (!user) {
        user = await User.create(
          { email: p.email, displayName: p.name, role: p.role, passwordHash: p.password ? await hashPassword(p.password) : null },
          { transaction },
        );
      }
      if (p.courseRole) {
        await CourseMembership.findOrCreate({ where: { courseId: course.id, userId: user.id }, defaults: { courseId: course.id, userId: user.id, role: p.courseRole }, transaction });
      }
    }
    await seedPlanningDemo(course, transaction, () => hashPassword("demo-student-pass"));
  });
  // Invented submissions for the demo's planned practical (none until one is planned).
  const { seedDemoSubmissions } = await import("./demo-submissions");
  await seedDemoSubmissions();
  return DEMO_SIGN_INS;
}
