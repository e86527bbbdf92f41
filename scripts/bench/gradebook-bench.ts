// The course gradebook under load. Seeds an invented course of 300 students in 75 groups with 12
// practicals (a bench per group in each, one or two marked versions per group made by the real
// engine and rubric from simulated runs), then:
//   1. stages of GET /api/courses/:id/gradebook timed in this process, 20 at once;
//   2. HTTP at 20 concurrent clients on loopback for BENCH_SECONDS (20) against the production
//      server: a static file from the same server (the ceiling), the course gradebook signed in
//      with the cookie and with a personal token, and one practical's gradebook;
//   3. the verdict against the target: at least 300 requests a second, 99th percentile under 100 ms.
// Usage: npm run bench:gradebook   (BENCH_SECONDS=20, BENCH_APP_PORT=3190; its own ratebook_bench
// database, emptied first). Exits 1 when the course gradebook misses the target.
import { QueryTypes } from "sequelize";
import { BENCH_BASE, ensureBuild, load, machineNote, openBenchDatabase, printLoadTable, signIn, startAppServer, staticAssetPath } from "./lib/http-load";

const SECONDS = Number(process.env.BENCH_SECONDS ?? 20);
const CONNECTIONS = 20;
const STUDENTS = 300;
const GROUP_SIZE = 4;
const PRACTICALS = 12;
const INSTRUCTOR = { email: "instructor@demo.ratebook.invalid", password: "demo-instructor-pass" };
const TARGET = { rps: 300, p99: 100 };

const db = await openBenchDatabase();
const { getSequelize } = await import("../../app/.server/db/sequelize.server");
const { Course, CourseMembership, User } = await import("../../app/.server/db/models.server");
const { Group, GroupMember } = await import("../../app/.server/db/groups.server");
const { ReactionSystem } = await import("../../app/.server/db/reaction-systems.server");
const { Bench, LabSession } = await import("../../app/.server/db/lab-sessions.server");
const { Submission } = await import("../../app/.server/db/submissions.server");
const { markRun } = await import("../../app/lib/marking/mark-run");
const { simulateRun } = await import("../../app/lib/marking/simulate");
const { markColumns } = await import("../../app/.server/submissions/marking.server");
const { rubricFrom } = await import("../../app/lib/marking/rubric");
const { rateConstantAt } = await import("../../app/lib/kinetics");
const { createApiToken } = await import("../../app/.server/api-tokens.server");
const sequelize = getSequelize();

// --- seed (invented) -------------------------------------------------------------------------
const t0 = performance.now();
const instructor = (await User.findOne({ where: { email: INSTRUCTOR.email } }))!;
const course = await Course.create({ code: "BENCH-GB", title: "Gradebook benchmark course (invented)", term: "Bench" });
await CourseMembership.create({ courseId: course.id, userId: instructor.id, role: "instructor" });
const reference = { kRef: 0.11, TrefC: 25, EaKJ: 45 };
const system = await ReactionSystem.create({
  courseId: course.id, name: "Invented A + B", speciesA: "ester (invented)", speciesB: "hydroxide", coeffA: 1, coeffB: 1, orderA: 1, orderB: 1,
  ...reference, measured: "concentration",
});
const users = await User.bulkCreate(
  Array.from({ length: STUDENTS }, (_, i) => ({ email: `bench-student-${i + 1}@bench.ratebook.invalid`, displayName: `Student ${String(i + 1).padStart(3, "0")} (invented)`, role: "member" as const, passwordHash: null })),
  { returning: true },
);
await CourseMembership.bulkCreate(users.map((u, i) => ({ courseId: course.id, userId: u.id, role: "student" as const, studentNumber: `B${String(i + 1).padStart(6, "0")}` })));
const groups = await Group.bulkCreate(Array.from({ length: STUDENTS / GROUP_SIZE }, (_, i) => ({ courseId: course.id, name: `Group ${i + 1}` })), { returning: true });
await GroupMember.bulkCreate(users.map((u, i) => ({ groupId: groups[Math.floor(i / GROUP_SIZE)].id, courseId: course.id, userId: u.id })));

const rubric = { fullWithinPct: 10, partialWithinPct: 25, partialFraction: 0.5, analysisWeight: 0.4, experimentWeight: 0.6, latePenaltyPct: 10 };
let versions = 0;
let firstSessionId = 0;
for (let p = 0; p < PRACTICALS; p++) {
  const session = await LabSession.create({
    courseId: course.id, reactionSystemId: system.id, title: `Practical ${p + 1}`, date: `2026-0${1 + Math.floor(p / 4)}-${String(5 + (p % 4) * 7).padStart(2, "0")}`,
    slotMinutes: 180, setupMinutes: 30, reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, samplingIntervalS: 60, rubric,
    deadline: new Date(Date.UTC(2026, 0, 1) + p * 7 * 86_400_000), status: "closed",
  });
  firstSessionId ||= session.id;
  const benches = await Bench.bulkCreate(
    groups.map((g, i) => ({ sessionId: session.id, position: i + 1, label: String(i + 1), CA0: 0.02, CB0: Number((0.025 + 0.0005 * (i % 25)).toFixed(4)), temperatureC: 20 + 5 * Math.floor(i / 25), groupId: g.id })),
    { returning: true },
  );
  const rows = [];
  for (const [i, bench] of benches.entries()) {
    if ((i + p) % 15 === 0) continue; // a few groups never upload: missing work
    const k = rateConstantAt(reference.kRef, reference.TrefC + 273.15, reference.EaKJ * 1000, bench.temperatureC + 273.15);
    const twoVersions = (i + p) % 3 === 0;
    for (let v = 1; v <= (twoVersions ? 2 : 1); v++) {
      const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k, n: 30, seed: 1000 * p + 10 * i + v, mistake: (i + v) % 7 === 0 ? "minutes-as-seconds" : "none", noise: 0.01 });
      const points = run.rows.map(([t, c]) => [t, c] as [number, number]);
      const rowNumbers = points.map((_, r) => r + 2);
      const attempt = markRun(
        { reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, temperatureC: bench.temperatureC, measurement: { kind: "concentrationA" }, reference: { k: reference.kRef, TrefC: reference.TrefC, EaKJ: reference.EaKJ }, rubric: rubricFrom(rubric) },
        { points, rowNumbers, timeUnit: run.timeUnit, concentrationUnit: run.concentrationUnit, measured: "concentrationA", reportedK: run.reportedK, reportedMethod: run.reportedMethod, late: false, excludedRows: [] },
      );
      rows.push({
        groupId: bench.groupId!, sessionId: session.id, benchId: bench.id, version: v, submittedAt: new Date(), late: false, measured: "concentrationA",
        timeUnit: run.timeUnit, concentrationUnit: run.concentrationUnit, reportedK: run.reportedK, reportedMethod: run.reportedMethod, timeColumn: null, valueColumn: null, submittedById: null,
        readings: { points, rowNumbers, time: { letter: "A", header: run.header[0], unit: run.timeUnit }, value: { letter: "B", header: run.header[1], unit: run.concentrationUnit }, notes: [] },
        ...markColumns(attempt), markedAt: new Date(), markingRuns: 1,
      });
      versions++;
    }
  }
  await Submission.bulkCreate(rows as never[]);
}
await sequelize.query("analyze");
const [{ size }] = await sequelize.query<{ size: string }>("select pg_size_pretty(pg_total_relation_size('submissions')) as size", { type: QueryTypes.SELECT });
console.log(`[bench] seeded ${STUDENTS} students, ${groups.length} groups, ${PRACTICALS} practicals, ${versions} marked versions (submissions table ${size}) in ${((performance.now() - t0) / 1000).toFixed(1)} s`);

// --- 1. stages in this process -------------------------------------------------------------------
const { currentUser } = await import("../../app/.server/guards.server");
const { requireCourseGradebook } = await import("../../app/.server/gradebook/access.server");
const { buildCourseGradebook, courseGradebook } = await import("../../app/.server/gradebook/course.server");
const { buildSessionGradebook, sessionGradebook } = await import("../../app/.server/gradebook/session.server");
const { gzipSync } = await import("node:zlib");
ensureBuild();
const app = await startAppServer();
try {
  const cookie = await signIn(INSTRUCTOR.email, INSTRUCTOR.password);
  const { token } = await createApiToken(instructor, "gradebook bench", 1);
  const url = `${BENCH_BASE}/api/courses/${course.id}/gradebook`;
  const me = (await currentUser(new Request(url, { headers: { Cookie: cookie } })))!;
  const book = await courseGradebook(course.id);
  const body = JSON.stringify(book);

  async function stage(name: string, n: number, f: () => Promise<unknown>) {
    for (let i = 0; i < 100; i++) await f();
    let started = 0;
    const start = performance.now();
    await Promise.all(Array.from({ length: CONNECTIONS }, async () => { while (started++ < n) await f(); }));
    return { name, us: ((performance.now() - start) / n) * 1000 };
  }
  const stages = [
    await stage("who is asking: currentUser (cookie + lookup)", 2000, () => currentUser(new Request(url, { headers: { Cookie: cookie } }))),
    await stage("course access + version (one query)", 2000, () => requireCourseGradebook(me, course.id, true)),
    await stage("build the course gradebook (4 queries + totals)", 300, () => buildCourseGradebook(course.id)),
    await stage("kept course gradebook (version query)", 2000, () => courseGradebook(course.id)),
    await stage("JSON body: Response.json + text()", 2000, async () => Response.json(book).text()),
    await stage("gzip of the body (if compressed)", 1000, async () => gzipSync(body)),
    await stage("build one practical's gradebook", 300, () => buildSessionGradebook(firstSessionId)),
    await stage("kept practical gradebook (version query)", 2000, () => sessionGradebook(firstSessionId)),
  ];
  console.log(`\nStages of GET /api/courses/:id/gradebook, wall time per call with ${CONNECTIONS} at once (${machineNote()}); body ${(body.length / 1024).toFixed(0)} kB, ${book!.rows.length} rows × ${book!.sessions.length} practicals`);
  for (const s of stages) console.log(`  ${s.name.padEnd(50)} ${s.us.toFixed(0).padStart(6)} µs`);
  await db.close();

  // --- 2. HTTP ------------------------------------------------------------------------------------
  const rows = [];
  rows.push(await load("static file (ceiling)", BENCH_BASE + staticAssetPath(), { seconds: SECONDS, serverPid: app.child.pid }));
  rows.push(await load("course gradebook, cookie", url, { seconds: SECONDS, headers: { Cookie: cookie }, serverPid: app.child.pid }));
  rows.push(await load("course gradebook, Bearer token", url, { seconds: SECONDS, headers: { Authorization: `Bearer ${token}` }, serverPid: app.child.pid }));
  rows.push(await load("one practical's gradebook, cookie", `${BENCH_BASE}/api/sessions/${firstSessionId}/gradebook`, { seconds: SECONDS, headers: { Cookie: cookie }, serverPid: app.child.pid }));
  console.log(`\nHTTP, ${CONNECTIONS} concurrent clients, ${SECONDS} s each, loopback (${machineNote()})`);
  printLoadTable(rows);
  const [ceiling, cookieRun] = rows;
  const ok = cookieRun.rps >= TARGET.rps && cookieRun.p99 < TARGET.p99 && cookieRun.non2xx === 0 && cookieRun.errors === 0;
  console.log(`\ncourse gradebook: ${cookieRun.rps.toFixed(0)} req/s (target ≥ ${TARGET.rps}), p99 ${cookieRun.p99.toFixed(1)} ms (target < ${TARGET.p99}), ${((cookieRun.rps / ceiling.rps) * 100).toFixed(0)} % of the static-file ceiling: ${ok ? "MET" : "MISSED"}`);
  process.exitCode = ok ? 0 : 1;
} finally {
  await app.stop();
}
process.exit(process.exitCode ?? 0);
