// Course workbook benchmark: how long the .xlsx download of a big course takes to build, and how
// large it is. In a database of its own (ratebook_bench_export, dropped at the end) it seeds an
// invented course of BENCH_STUDENTS (300) students in groups of 3 and BENCH_PRACTICALS (12)
// practicals, every group at a bench in each, each group's latest version marked, with 20-60
// readings (the engine's closed form at its bench plus seeded noise) and its original file; one
// group in 20 has uploaded nothing, one in 25 has an override. Then, in this process, through the
// download's own code path (a Bearer token, access check, gradebooks, readings, workbook, Response):
// one warm-up, BENCH_RUNS (5) timed runs of the course workbook after a change to the course (the
// gradebooks built again) and with them kept, its two halves, the marks CSV, and
// (when LibreOffice is installed and BENCH_LIBREOFFICE is not 0) one LibreOffice conversion.
// Target: the course workbook in under 3 s. Exits 1 when missed.
// Usage: npm run bench:export  (BENCH_STUDENTS=300, BENCH_PRACTICALS=12, BENCH_RUNS=5, BENCH_LIBREOFFICE=1)
import fs from "node:fs";
import { dropDatabase, ensurePostgres } from "../lib/postgres";
import { machineNote } from "./lib/http-load";

const DB_NAME = "ratebook_bench_export";
const STUDENTS = Number(process.env.BENCH_STUDENTS ?? 300);
const PRACTICALS = Number(process.env.BENCH_PRACTICALS ?? 12);
const RUNS = Number(process.env.BENCH_RUNS ?? 5);
const GROUP_SIZE = 3;
const TARGET_MS = 3000;
// Invented reference for the bench practicals: A + B, first order in each.
const REFERENCE = { kRef: 0.11, TrefC: 25, EaKJ: 50 };

delete process.env.DATABASE_URL;
process.env.DATABASE_URL = await ensurePostgres(DB_NAME, { reset: true });
process.env.SESSION_SECRET ??= "bench-only-session-secret-of-32-characters-or-more";
process.env.BCRYPT_COST ??= "4";

const { getSequelize, closeSequelize } = await import("../../app/.server/db/sequelize.server");
const misses: string[] = [];
try {
  const { createMigrator } = await import("../../db/migrator");
  await createMigrator(getSequelize(), { quiet: true }).up();

  const t0 = performance.now();
  const seeded = await seed();
  console.log(`[bench] seeded ${STUDENTS} students, ${seeded.groups} groups, ${PRACTICALS} practicals, ${seeded.submissions} marked submissions with ${seeded.readings} readings in all, in ${((performance.now() - t0) / 1000).toFixed(1)} s`);

  const { exportDownload, courseExportData, exportWorkbook } = await import("../../app/.server/exports/gradebook-export.server");
  const url = `http://127.0.0.1/courses/${seeded.courseId}/export.xlsx`;
  const download = async (format: "xlsx" | "csv") => {
    const res = await exportDownload(new Request(url.replace("xlsx", format), { headers: { Authorization: `Bearer ${seeded.token}` } }), "course", String(seeded.courseId), format);
    if (res.status !== 200) throw new Error(`the download answered ${res.status}: ${await res.text()}`);
    return new Uint8Array(await res.arrayBuffer());
  };

  // A change to the course (here a no-op update of its row) raises its gradebook version, so the
  // next export builds the gradebooks again, as after a mark changes; without one they are kept.
  const { QueryTypes } = await import("sequelize");
  const touch = () => getSequelize().query("update courses set title = title where id = $1", { bind: [seeded.courseId], type: QueryTypes.UPDATE });
  const first = await download("xlsx"); // warm-up (JIT, pool)
  const times: number[] = [];
  const cpuMs: number[] = [];
  const keptMs: number[] = [];
  const dataMs: number[] = [];
  const bookMs: number[] = [];
  let peakRss = 0;
  for (let i = 0; i < RUNS; i++) {
    await touch();
    const a = performance.now();
    const cpu = process.cpuUsage();
    await download("xlsx");
    times.push(performance.now() - a);
    const used = process.cpuUsage(cpu);
    cpuMs.push((used.user + used.system) / 1000);
    peakRss = Math.max(peakRss, process.memoryUsage().rss);
    const k = performance.now();
    await download("xlsx");
    keptMs.push(performance.now() - k);
    // the same work in its two halves, after a change
    await touch();
    const b = performance.now();
    const data = (await courseExportData(seeded.courseId))!;
    const c = performance.now();
    await exportWorkbook(data);
    dataMs.push(c - b);
    bookMs.push(performance.now() - c);
  }
  const csvTimes: number[] = [];
  let csvBytes = 0;
  for (let i = 0; i < RUNS; i++) {
    await touch();
    const a = performance.now();
    csvBytes = (await download("csv")).byteLength;
    csvTimes.push(performance.now() - a);
  }
  // marks, practicals, a fit sheet per practical and a readings sheet per submission
  const sheets = 2 + PRACTICALS + seeded.submissions;

  const med = (xs: number[]) => [...xs].sort((x, y) => x - y)[Math.floor(xs.length / 2)];
  const ms = (x: number) => `${x.toFixed(0)} ms`;
  console.log(`\nCourse workbook, ${STUDENTS} students x ${PRACTICALS} practicals (${machineNote()})`);
  console.log(`  GET /courses/:id/export.xlsx, in process, after a change   median ${ms(med(times))}, max ${ms(Math.max(...times))} over ${RUNS} runs (target < ${TARGET_MS} ms)`);
  console.log(`    CPU time of this process (steadier on a shared machine)   median ${ms(med(cpuMs))}`);
  console.log(`    gradebooks and readings from the database               median ${ms(med(dataMs))}`);
  console.log(`    building and writing the workbook                       median ${ms(med(bookMs))}`);
  console.log(`  the same with the gradebooks kept (no change since)       median ${ms(med(keptMs))}`);
  console.log(`  file size                                               ${(first.byteLength / 1024 / 1024).toFixed(2)} MB (${first.byteLength} bytes), ${sheets} sheets`);
  console.log(`  process memory (RSS) at most                             ${(peakRss / 1024 / 1024).toFixed(0)} MB`);
  console.log(`  GET /courses/:id/export.csv, after a change              median ${ms(med(csvTimes))}, ${csvBytes} bytes`);
  if (med(times) > TARGET_MS) misses.push(`the course workbook took ${ms(med(times))} (target < ${TARGET_MS} ms)`);

  if (process.env.BENCH_LIBREOFFICE !== "0") {
    const { SOFFICE, libreOfficeSheets } = await import("../../tests/setup/libreoffice");
    if (fs.existsSync(SOFFICE)) {
      const a = performance.now();
      const read = libreOfficeSheets(first, ["Marks"]);
      console.log(`  LibreOffice headless conversion to CSV                  ${((performance.now() - a) / 1000).toFixed(1)} s (every sheet; Marks read back: ${read.Marks.length - 1} students)`);
      if (read.Marks.length - 1 !== STUDENTS) misses.push(`LibreOffice read ${read.Marks.length - 1} students from the marks sheet, not ${STUDENTS}`);
    } else console.log(`  LibreOffice: not installed at ${SOFFICE}; conversion not timed`);
  }
} finally {
  await closeSequelize().catch(() => undefined);
  await dropDatabase(DB_NAME).catch((e) => console.error(`[bench] could not drop ${DB_NAME}: ${(e as Error).message}`));
}
console.log(misses.length ? `\nMISSED:\n  ${misses.join("\n  ")}` : "\nAll targets met.");
process.exit(misses.length ? 1 : 0);

/** A small seeded generator (mulberry32), so every run seeds the same course. */
function random(seedValue: number) {
  let a = seedValue >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

async function seed() {
  const { Course, CourseMembership, User } = await import("../../app/.server/db/models.server");
  const { Group, GroupMember } = await import("../../app/.server/db/groups.server");
  const { ReactionSystem } = await import("../../app/.server/db/reaction-systems.server");
  const { Bench, LabSession } = await import("../../app/.server/db/lab-sessions.server");
  const { Submission, SubmissionFile } = await import("../../app/.server/db/submissions.server");
  const { hashPassword } = await import("../../app/.server/passwords.server");
  const { createApiToken } = await import("../../app/.server/api-tokens.server");
  const { simulateRun, runCsv } = await import("../../app/lib/marking/simulate");
  const { rateConstantAt } = await import("../../app/lib/kinetics/index");
  const crypto = await import("node:crypto");
  const rnd = random(20260601);

  const course = await Course.create({ code: "BENCH-EXP", title: "Export benchmark course (invented)", term: "Bench term" });
  const hash = await hashPassword("bench-only-password");
  const instructor = await User.create({ email: "bench-exp-instructor@bench.ratebook.invalid", displayName: "Bench instructor", role: "course-creator", passwordHash: hash });
  await CourseMembership.create({ courseId: course.id, userId: instructor.id, role: "instructor" });
  const students = await User.bulkCreate(
    Array.from({ length: STUDENTS }, (_, i) => ({ email: `bench-exp-s${i + 1}@bench.ratebook.invalid`, displayName: `Bench student ${String(i + 1).padStart(3, "0")}`, role: "member" as const, passwordHash: hash })),
  );
  await CourseMembership.bulkCreate(students.map((s, i) => ({ courseId: course.id, userId: s.id, role: "student" as const, studentNumber: `B${String(100000 + i)}` })));
  const groupCount = Math.ceil(STUDENTS / GROUP_SIZE);
  const groups = await Group.bulkCreate(Array.from({ length: groupCount }, (_, i) => ({ courseId: course.id, name: `Group ${i + 1}` })));
  await GroupMember.bulkCreate(students.map((s, i) => ({ groupId: groups[Math.floor(i / GROUP_SIZE)].id, courseId: course.id, userId: s.id })));
  const system = await ReactionSystem.create({
    courseId: course.id, name: "Invented A + B (bench)", speciesA: "ester X (invented)", speciesB: "hydroxide", coeffA: 1, coeffB: 1, orderA: 1, orderB: 1,
    ...REFERENCE, measured: "concentration",
  });

  let submissions = 0;
  let readings = 0;
  for (let p = 0; p < PRACTICALS; p++) {
    const session = await LabSession.create({
      courseId: course.id, reactionSystemId: system.id, title: `Bench practical ${p + 1}`, date: `2026-${String(1 + Math.floor(p / 4)).padStart(2, "0")}-${String(5 + 7 * (p % 4)).padStart(2, "0")}`,
      slotMinutes: 180, setupMinutes: 30, reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, samplingIntervalS: 60,
      rubric: { fullWithinPct: 10, partialWithinPct: 25, partialFraction: 0.5, analysisWeight: 0.4, experimentWeight: 0.6, latePenaltyPct: 10 },
      deadline: new Date(Date.UTC(2026, 0, 1 + 7 * p)), status: p < PRACTICALS - 2 ? "closed" : "notified", gradeWeight: 1 + (p % 3),
      marksReleasedAt: p < PRACTICALS - 3 ? new Date(Date.UTC(2026, 0, 8 + 7 * p)) : null,
    });
    // every bench its own (feed, temperature): 5 temperatures x groupCount/5 feeds of B
    const benches = await Bench.bulkCreate(groups.map((g, i) => ({
      sessionId: session.id, position: i + 1, label: String(i + 1), CA0: 0.02, CB0: Number((0.025 + 0.0005 * Math.floor(i / 5)).toFixed(4)), temperatureC: 20 + 5 * (i % 5), groupId: g.id,
    })));
    const rows: Array<Record<string, unknown>> = [];
    const files: string[] = [];
    for (const [i, bench] of benches.entries()) {
      if ((i + p) % 20 === 7) continue; // uploaded nothing
      const k = rateConstantAt(REFERENCE.kRef, REFERENCE.TrefC + 273.15, REFERENCE.EaKJ * 1000, bench.temperatureC + 273.15);
      const n = 20 + Math.floor(rnd() * 41);
      const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k, n, seed: 1 + p * 1000 + i });
      const kFit = k * (1 + 0.04 * (rnd() - 0.5));
      const se = kFit * (0.005 + 0.02 * rnd());
      const deviationPct = (100 * (kFit - k)) / k;
      const override = (i + p) % 25 === 3;
      rows.push({
        groupId: bench.groupId, sessionId: session.id, benchId: bench.id, version: 1, submittedAt: new Date(Date.UTC(2026, 0, 1 + 7 * p, 12, i % 60)), status: "marked",
        measured: "concentrationA", timeUnit: run.timeUnit, concentrationUnit: run.concentrationUnit, reportedK: run.reportedK, reportedMethod: run.reportedMethod,
        timeColumn: null, valueColumn: null, submittedById: null, late: i % 17 === 0,
        readings: {
          points: run.rows.map(([t, c]) => [t, c]), rowNumbers: run.rows.map((_, r) => r + 2),
          time: { letter: "A", header: run.header[0], unit: run.timeUnit }, value: { letter: "B", header: run.header[1], unit: run.concentrationUnit }, notes: [],
        },
        fit: { k: kFit, kStdErr: se, kCI95: [kFit - 2.1 * se, kFit + 2.1 * se] },
        checks: { kMarking: kFit, kLine: run.reportedK, kRefAtT: k, experiment: { deviationPct, band: "full", score: 1 }, analysis: { deviationPct: 1, band: "full", score: 1 }, rowNumbers: [] },
        flags: i % 9 === 0 ? [{ code: "outlier", message: "invented flag", rows: [3] }] : [],
        experimentPart: 60, analysisPart: 40, latePenalty: i % 17 === 0 ? 10 : 0, autoMark: i % 17 === 0 ? 90 : 100 - Math.round(10 * rnd()),
        overrideMark: override ? 75 : null, overrideReason: override ? "Set by hand (bench data)" : null,
      });
      files.push(runCsv(run));
      readings += n;
    }
    const stored = await Submission.bulkCreate(rows as never[]);
    await SubmissionFile.bulkCreate(stored.map((s, i) => {
      const bytes = Buffer.from(files[i]);
      return { submissionId: s.id, bytes, size: bytes.byteLength, sha256: crypto.createHash("sha256").update(bytes).digest("hex"), contentType: "text/csv", originalName: `readings group ${s.groupId}.csv` };
    }));
    submissions += stored.length;
  }
  const { token } = await createApiToken(instructor, "export benchmark", 1);
  return { courseId: course.id, groups: groupCount, submissions, readings, token };
}
