// Where a signed-in API request spends its time. Prints two tables:
//   1. the stages of `GET /api/me` timed in this process, 20 at once (who is asking: cookie and
//      person lookup; the course list; the JSON body; gzip of it), the ORM way beside plain SQL;
//   2. HTTP figures at 20 concurrent clients on loopback from the production server: a static
//      file (the ceiling), the same path signed out (framework and guard, no database), signed in;
//      and a bare node:http server with a 20 kB JSON body for scale.
// Usage: npm run bench:me   (BENCH_SECONDS=20, BENCH_APP_PORT=3190, BENCH_BARE_PORT=3191)
import { gzipSync } from "node:zlib";
import { QueryTypes } from "sequelize";
import {
  BENCH_BASE,
  ensureBuild,
  load,
  machineNote,
  openBenchDatabase,
  printLoadTable,
  signIn,
  startAppServer,
  startBareServer,
  staticAssetPath,
} from "./lib/http-load";

const SECONDS = Number(process.env.BENCH_SECONDS ?? 20);
const CONNECTIONS = 20;
const INSTRUCTOR = { email: "instructor@demo.ratebook.invalid", password: "demo-instructor-pass" };

const db = await openBenchDatabase();
ensureBuild();
const app = await startAppServer();
const bare = await startBareServer();
try {
  const cookie = await signIn(INSTRUCTOR.email, INSTRUCTOR.password);

  // 1. Stages, in this process, against the same database.
  const { currentUser } = await import("../../app/.server/guards.server");
  const { courseRolesFor, coursesFor } = await import("../../app/.server/courses.server");
  const { Course, CourseMembership, User } = await import("../../app/.server/db/models.server");
  const { getSequelize } = await import("../../app/.server/db/sequelize.server");
  const sequelize = getSequelize();
  const me = await currentUser(new Request(`${BENCH_BASE}/api/me`, { headers: { Cookie: cookie } }));
  if (!me) throw new Error("the bench cookie does not sign in");
  const body = JSON.stringify({ user: { id: me.id, email: me.email }, courses: await courseRolesFor(me) });

  async function stage(name: string, n: number, f: () => Promise<unknown>) {
    for (let i = 0; i < 200; i++) await f(); // warm-up (JIT, pool)
    let started = 0;
    const t0 = performance.now();
    await Promise.all(
      Array.from({ length: CONNECTIONS }, async () => {
        while (started < n) {
          started++;
          await f();
        }
      }),
    );
    const us = ((performance.now() - t0) / n) * 1000;
    return { name, us };
  }
  const stages = [
    await stage("who is asking: currentUser (cookie + lookup)", 4000, () => currentUser(new Request(`${BENCH_BASE}/api/me`, { headers: { Cookie: cookie } }))),
    await stage("course list as /api/me reads it", 4000, () => courseRolesFor(me)),
    await stage("  ORM: coursesFor (include + counts)", 2000, () => coursesFor(me)),
    await stage("  ORM: memberships findAll with include", 2000, () =>
      CourseMembership.findAll({ where: { userId: me.id }, include: [{ model: Course, as: "course" }] }),
    ),
    await stage("  ORM: User.findByPk", 4000, () => User.findByPk(me.id)),
    await stage("  SQL: select the user row", 4000, () =>
      sequelize.query("select id, email, role, display_name from users where id = $1", { bind: [me.id], type: QueryTypes.SELECT }),
    ),
    await stage("  SQL: select 1 (pool round trip)", 4000, () => sequelize.query("select 1", { type: QueryTypes.SELECT })),
    await stage("JSON body: Response.json + text()", 20000, () => Response.json(JSON.parse(body)).text()),
    await stage("gzip of the body (compression)", 20000, async () => gzipSync(body)),
  ];
  console.log(`\nStages of GET /api/me, wall time per call with ${CONNECTIONS} at once (${machineNote()})`);
  for (const s of stages) console.log(`  ${s.name.padEnd(46)} ${s.us.toFixed(0).padStart(6)} µs`);
  await db.close();

  // 2. HTTP, one run after another so they do not share the cores.
  const rows = [];
  rows.push(await load("static file (ceiling)", BENCH_BASE + staticAssetPath(), { seconds: SECONDS, serverPid: app.child.pid }));
  rows.push(await load("bare node:http, 20 kB JSON", bare.url, { seconds: SECONDS, serverPid: bare.child.pid }));
  rows.push(await load("GET /api/me signed out (401)", `${BENCH_BASE}/api/me`, { seconds: SECONDS, serverPid: app.child.pid }));
  rows.push(await load("GET /api/me signed in", `${BENCH_BASE}/api/me`, { seconds: SECONDS, headers: { Cookie: cookie }, serverPid: app.child.pid }));
  console.log(`\nHTTP, ${CONNECTIONS} concurrent clients, ${SECONDS} s each, loopback (${machineNote()})`);
  printLoadTable(rows);
  const [ceiling, , , signedIn] = rows;
  console.log(`\nsigned-in /api/me reaches ${((signedIn.rps / ceiling.rps) * 100).toFixed(0)} % of the static-file ceiling`);
} finally {
  await app.stop();
  await bare.stop();
}
process.exit(0);
