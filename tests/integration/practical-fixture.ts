// A small invented practical for tests: a course with an instructor, groups of students (each with
// a password to sign in), a reaction system with an Arrhenius reference and benches with their
// own feed and temperature. Made fresh by each test file under its own course code.
import { Course, CourseMembership, User } from "~/.server/db/models.server";
import { Group, GroupMember } from "~/.server/db/groups.server";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { hashPassword } from "~/.server/passwords.server";
import { rateConstantAt } from "~/lib/kinetics";
import { signInAs } from "./helpers";

export const PASSWORD = "fixture-pass-123";
// Invented reference: A + B, first order in each; k at 25 degC and Ea made up for the tests.
export const REFERENCE = { kRef: 0.11, TrefC: 25, EaKJ: 50 };

export interface Practical {
  course: Course;
  session: LabSession;
  system: ReactionSystem;
  benches: Bench[];
  groups: Group[];
  students: User[];
  instructor: User;
  /** reference k at a bench's temperature (Arrhenius), per second */
  kAt: (bench: Bench) => number;
  cookie: (user: User) => Promise<string>;
}

export async function makePractical(code: string, opts: { groups?: number; deadline?: Date | null; measured?: "concentration" | "conductivity"; rubric?: object } = {}): Promise<Practical> {
  const n = opts.groups ?? 3;
  const course = await Course.create({ code, title: `Test course ${code} (invented)`, term: "" });
  const hash = await hashPassword(PASSWORD);
  const instructor = await User.create({ email: `${code.toLowerCase()}-instructor@test.ratebook.invalid`, displayName: `Instructor ${code}`, role: "course-creator", passwordHash: hash });
  await CourseMembership.create({ courseId: course.id, userId: instructor.id, role: "instructor" });
  const system = await ReactionSystem.create({
    courseId: course.id, name: "Invented A + B", speciesA: "ester X (invented)", speciesB: "hydroxide", coeffA: 1, coeffB: 1, orderA: 1, orderB: 1,
    ...REFERENCE, measured: opts.measured ?? "concentration",
  });
  const session = await LabSession.create({
    courseId: course.id, reactionSystemId: system.id, title: `Practical ${code}`, date: new Date().toISOString().slice(0, 10), slotMinutes: 180, setupMinutes: 30,
    reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, samplingIntervalS: 60,
    rubric: (opts.rubric as never) ?? { fullWithinPct: 10, partialWithinPct: 25, partialFraction: 0.5, analysisWeight: 0.4, experimentWeight: 0.6, latePenaltyPct: 10 },
    deadline: opts.deadline ?? null, status: "planned",
  });
  const groups: Group[] = [];
  const students: User[] = [];
  const benches: Bench[] = [];
  for (let i = 0; i < n; i++) {
    const group = await Group.create({ courseId: course.id, name: `G${i + 1}` });
    const student = await User.create({ email: `${code.toLowerCase()}-s${i + 1}@test.ratebook.invalid`, displayName: `Student ${i + 1} ${code}`, role: "member", passwordHash: hash });
    await CourseMembership.create({ courseId: course.id, userId: student.id, role: "student" });
    await GroupMember.create({ groupId: group.id, courseId: course.id, userId: student.id });
    benches.push(await Bench.create({ sessionId: session.id, position: i + 1, label: String(i + 1), CA0: 0.02, CB0: 0.03 + 0.005 * i, temperatureC: 25 + 5 * i, groupId: group.id }));
    groups.push(group);
    students.push(student);
  }
  return {
    course, session, system, benches, groups, students, instructor,
    kAt: (b) => rateConstantAt(REFERENCE.kRef, REFERENCE.TrefC + 273.15, REFERENCE.EaKJ * 1000, b.temperatureC + 273.15),
    cookie: (u) => signInAs(u.email, PASSWORD),
  };
}

/** A multipart upload request as a browser sends it (same origin). */
export function uploadRequest(path: string, cookie: string, file: { bytes: Uint8Array | string; name: string; type?: string } | null, fields: Record<string, string> = {}) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.append(k, v);
  if (file) {
    const bytes = typeof file.bytes === "string" ? new TextEncoder().encode(file.bytes) : file.bytes;
    form.append("file", new Blob([bytes as BlobPart], { type: file.type ?? "text/csv" }), file.name);
  }
  return new Request(`http://127.0.0.1:3100${path}`, { method: "POST", body: form, headers: { Cookie: cookie, Origin: "http://127.0.0.1:3100" } });
}
