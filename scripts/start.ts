// `npm start` : everything for a local demo in one command. Starts PostgreSQL on loopback,
// migrates, adds the demo data, starts the local mail sink, builds, serves, prints sign-ins.
import { spawn, spawnSync } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { openAppDatabase } from "./lib/database";
import { startMailSink } from "./lib/mail-sink";
import { projectRoot } from "./lib/postgres";

const port = Number(process.env.PORT ?? 3000);
const bin = (name: string) => path.join(projectRoot, "node_modules", ".bin", name);

const db = await openAppDatabase();
await db.migrate(false);
const { seedDemo } = await import("../db/seeds/demo");
const signIns = await seedDemo();
console.log(`[db] ready at ${db.url.replace(/\/\/[^@]*@/, "//")}`);

const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: db.url, PORT: String(port) };
if (!process.env.SMTP_URL) {
  const smtpPort = Number(process.env.MAIL_SINK_SMTP_PORT ?? 2525);
  const httpPort = Number(process.env.MAIL_SINK_HTTP_PORT ?? 2526);
  try {
    await startMailSink({ smtpPort, httpPort, file: path.join(projectRoot, ".data", "mail", "messages.jsonl") });
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== "EADDRINUSE") throw error;
    console.error(
      `[mail] port ${smtpPort} or ${httpPort} is taken: is another \`npm start\` running? ` +
        "Stop it, or choose other ports with MAIL_SINK_SMTP_PORT and MAIL_SINK_HTTP_PORT.",
    );
    process.exit(1);
  }
  env.SMTP_URL = `smtp://127.0.0.1:${smtpPort}`;
  env.MAIL_SINK_URL = `http://127.0.0.1:${httpPort}`;
  console.log(`[mail] local mail sink on 127.0.0.1:${smtpPort}; admins read it at /admin/mail`);
}
// Single sign-on: without a real provider (OIDC_ISSUER), the demo runs the fake institution, a
// real OpenID provider on loopback with invented people (scripts/lib/fake-institution.ts).
let institution: Awaited<ReturnType<typeof import("./lib/fake-institution").startFakeInstitution>> | null = null;
if (!process.env.OIDC_ISSUER) {
  const { startFakeInstitution } = await import("./lib/fake-institution");
  const oidcPort = Number(process.env.FAKE_INSTITUTION_PORT ?? 3090);
  const appUrl = (process.env.APP_URL ?? `http://localhost:${port}`).replace(/\/$/, "");
  const client = { client_id: "ratebook-demo", client_secret: crypto.randomBytes(24).toString("hex"), redirect_uris: [`${appUrl}/sign-in/institution/return`] };
  try {
    institution = await startFakeInstitution({ port: oidcPort, clients: [client] });
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== "EADDRINUSE") throw error;
    console.error(`[sso] port ${oidcPort} is taken: is another \`npm start\` running? Stop it, or choose another port with FAKE_INSTITUTION_PORT.`);
    process.exit(1);
  }
  env.OIDC_ISSUER = institution.issuer;
  env.OIDC_CLIENT_ID = client.client_id;
  env.OIDC_CLIENT_SECRET = client.client_secret;
  env.OIDC_ID_CLAIM ??= "student_number";
  env.OIDC_LABEL ??= "Fake Institution (local demo, invented people)";
  console.log(`[sso] fake institution (OpenID provider) on ${institution.issuer}`);
}

// LTI 1.3: the fake learning platform (invented courses and people), registered in the demo
// database as an admin would, so its launches open Ratebook (scripts/lib/fake-platform.ts).
let learningPlatform: Awaited<ReturnType<typeof import("./lib/fake-platform").startFakePlatform>> | null = null;
if (process.env.FAKE_PLATFORM !== "0") {
  const { startFakePlatform } = await import("./lib/fake-platform");
  const ltiPort = Number(process.env.FAKE_PLATFORM_PORT ?? 3092);
  const appUrl = (process.env.APP_URL ?? `http://localhost:${port}`).replace(/\/$/, "");
  try {
    learningPlatform = await startFakePlatform({ port: ltiPort, clientId: "ratebook-demo-tool", deploymentId: "demo-deployment-1", toolLoginUrl: `${appUrl}/lti/login`, toolLaunchUrl: `${appUrl}/lti/launch`, toolKeySet: `${appUrl}/lti/jwks` });
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== "EADDRINUSE") throw error;
    console.error(`[lti] port ${ltiPort} is taken: is another \`npm start\` running? Stop it, or choose another port with FAKE_PLATFORM_PORT (FAKE_PLATFORM=0 leaves it out).`);
    process.exit(1);
  }
  const { LtiPlatform } = await import("../app/.server/db/lti.server");
  const fields = { name: "Fake Platform (local demo, invented)", loginUrl: learningPlatform.loginUrl, keySetUrl: learningPlatform.keySetUrl, tokenUrl: learningPlatform.tokenUrl, deploymentIds: [learningPlatform.deploymentId], createdById: null };
  const [row, created] = await LtiPlatform.findOrCreate({ where: { issuer: learningPlatform.issuer, clientId: learningPlatform.clientId }, defaults: { issuer: learningPlatform.issuer, clientId: learningPlatform.clientId, ...fields } });
  if (!created) await row.update(fields);
  console.log(`[lti] fake learning platform on ${learningPlatform.issuer} (its launch links: ${learningPlatform.issuer}/)`);
}

// The demo runs the job-queue worker (e-mail, marking) in this process; production runs
// `npm run worker` on machines of its own.
const { keepWorkerRunning } = await import("../app/.server/jobs/worker.server");
const worker = await keepWorkerRunning();
console.log("[jobs] worker running in this process");

// The local demo is served over plain http, where a Secure cookie would never come back.
env.SESSION_COOKIE_SECURE ??= "0";
env.APP_URL ??= `http://localhost:${port}`;
// The production server refuses a short secret: the demo makes one for this clone and keeps it
// (so sessions survive a restart) in .data/session-secret.
env.SESSION_SECRET ??= demoSessionSecret(path.join(projectRoot, ".data", "session-secret"));
// Loopback only unless told otherwise: it is a demo with published sign-ins.
env.HOST ??= "127.0.0.1";

function demoSessionSecret(file: string): string {
  if (fs.existsSync(file)) return fs.readFileSync(file, "utf8").trim();
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const secret = crypto.randomBytes(32).toString("hex");
  fs.writeFileSync(file, `${secret}\n`, { mode: 0o600 });
  return secret;
}

if (process.env.SKIP_BUILD !== "1") {
  console.log("[build] react-router build ...");
  const build = spawnSync(bin("react-router"), ["build"], { cwd: projectRoot, stdio: ["ignore", "ignore", "inherit"] });
  if (build.status !== 0) {
    console.error("[build] failed; run `npx react-router build` to see the whole output");
    process.exit(1);
  }
}

const server = spawn(bin("tsx"), ["scripts/serve.ts"], { cwd: projectRoot, env, stdio: ["ignore", "pipe", "inherit"] });
server.stdout.on("data", (chunk: Buffer) => {
  process.stdout.write(chunk);
  if (chunk.toString().includes("http://")) printSignIns();
});
let printed = false;
function printSignIns() {
  if (printed) return;
  printed = true;
  console.log(`\nRatebook is running at ${env.APP_URL}\n\nDemo sign-ins (invented demo data):`);
  for (const s of signIns) console.log(`  ${s.role.padEnd(13)} ${s.email.padEnd(38)} ${s.password}`);
  if (institution) {
    console.log(`\n"Sign in with your institution" (the fake institution; invented people):`);
    for (const p of institution.people) console.log(`  ${p.username.padEnd(13)} ${p.password.padEnd(18)} ${p.email}${p.email_verified ? "" : " (not verified)"}`);
  }
  console.log("\nPress Ctrl+C to stop. PostgreSQL keeps running; `npm run db:stop` stops it.\n");
}
for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, () => server.kill(sig));
server.on("exit", async (code) => {
  await worker.stop().catch(() => undefined);
  await institution?.close();
  await learningPlatform?.close();
  await db.close();
  process.exit(code ?? 0);
});
