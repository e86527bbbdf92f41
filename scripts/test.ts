// `npm test` : every suite, then one plain summary line `N passed, N failed`.
// Suites: typecheck (1 check), production build (1 check), vitest (unit, integration against a
// real PostgreSQL and mail sink, browser tests in Debian's chromium). The verdict comes from
// scripts/lib/test-summary.ts: any step that exits non-zero, writes no report or runs no test
// makes the run red, and the reasons are repeated just above the last line.
//
// For the runner's own test: `--steps vitest` runs only the named steps (comma-separated), and
// arguments after `--` go to vitest (e.g. one test file).
import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { clusterLocation, projectRoot, startLocalCluster } from "./lib/postgres";
import { firstErrorLine, summarize, summaryLines, type StepResult, type VitestReport } from "./lib/test-summary";

const bin = (name: string) => path.join(projectRoot, "node_modules", ".bin", name);
const chromium = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

const argv = process.argv.slice(2);
const dashdash = argv.indexOf("--");
const vitestExtra = dashdash >= 0 ? argv.slice(dashdash + 1) : [];
const own = dashdash >= 0 ? argv.slice(0, dashdash) : argv;
const stepsArg = own.includes("--steps") ? own[own.indexOf("--steps") + 1] : "typecheck,build,vitest";
const wanted = new Set(stepsArg.split(","));

const results: StepResult[] = [];
const setupProblems: string[] = [];

/** Runs a step with its output passed through live; keeps the output's tail to quote an error from it. */
async function run(name: string, cmd: string, args: string[]) {
  console.log(`\n=== ${name}: ${path.basename(cmd)} ${args.join(" ")}`);
  const t0 = Date.now();
  let tail = "";
  const child = spawn(cmd, args, { cwd: projectRoot, stdio: ["ignore", "pipe", "pipe"] });
  const keep = (chunk: Buffer, to: NodeJS.WriteStream) => {
    to.write(chunk);
    tail = (tail + chunk.toString()).slice(-200_000);
  };
  child.stdout.on("data", (c: Buffer) => keep(c, process.stdout));
  child.stderr.on("data", (c: Buffer) => keep(c, process.stderr));
  const { status, signal } = await new Promise<{ status: number | null; signal: NodeJS.Signals | null }>((resolve) => {
    child.on("error", () => resolve({ status: null, signal: null }));
    child.on("close", (code, sig) => resolve({ status: code, signal: sig }));
  });
  const ok = status === 0 && !signal;
  console.log(`=== ${name}: ${ok ? "passed" : "FAILED"} in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  return { status, signal, firstError: ok ? undefined : firstErrorLine(tail) };
}

function ensureChromium() {
  if (fs.existsSync(chromium)) return;
  if (process.getuid?.() === 0) {
    console.log("[test] chromium missing; installing Debian's package (never a downloaded browser) ...");
    spawnSync("apt-get", ["update", "-q"], { stdio: "inherit" });
    spawnSync("apt-get", ["install", "-y", "-q", "chromium"], { stdio: "inherit", env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } });
  } else {
    console.log(`[test] chromium is not at ${chromium}; the browser tests will fail. Install it: sudo apt-get install -y chromium`);
  }
}

// The export tests open our workbooks in a real spreadsheet program: LibreOffice Calc without
// its GUI (Debian's libreoffice-calc-nogui, about 280 MB installed), converted headless to CSV.
const soffice = process.env.SOFFICE_PATH ?? "/usr/bin/soffice";
function ensureLibreOffice() {
  if (fs.existsSync(soffice)) return;
  if (process.getuid?.() === 0) {
    console.log("[test] LibreOffice missing; installing Debian's libreoffice-calc-nogui for the spreadsheet checks ...");
    spawnSync("apt-get", ["update", "-q"], { stdio: "inherit" });
    spawnSync("apt-get", ["install", "-y", "-q", "libreoffice-calc-nogui"], { stdio: "inherit", env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } });
  } else {
    console.log(`[test] LibreOffice is not at ${soffice}; the spreadsheet checks will fail. Install it: sudo apt-get install -y libreoffice-calc-nogui`);
  }
}

const t0 = Date.now();
if (wanted.has("vitest")) {
  ensureChromium();
  ensureLibreOffice();
  // Start the cluster before vitest loads its config, so the test URL names the port it really
  // uses (a clash with another clone can move it).
  if (!process.env.DATABASE_URL && !process.env.TEST_DATABASE_URL) {
    try {
      const port = await startLocalCluster();
      console.log(`[test] PostgreSQL for the tests: 127.0.0.1:${port}, data in ${clusterLocation.dataDir}`);
    } catch (error) {
      setupProblems.push(`PostgreSQL could not be started: ${(error as Error).message.split("\n")[0]}`);
      console.log(`[test] PostgreSQL could not be started:\n${(error as Error).message}`);
    }
  }
}

if (wanted.has("typecheck")) {
  results.push({ kind: "command", name: "typecheck", ...await run("typecheck", "sh", ["-c", `"${bin("react-router")}" typegen && "${bin("tsc")}"`]) });
}
if (wanted.has("build")) {
  results.push({ kind: "command", name: "build", ...await run("build", "sh", ["-c", `"${bin("react-router")}" build`]) });
}
if (wanted.has("vitest")) {
  const report = path.join(projectRoot, ".data", `vitest-report-${process.pid}.json`);
  fs.mkdirSync(path.dirname(report), { recursive: true });
  fs.rmSync(report, { force: true });
  const res = await run("vitest", bin("vitest"), ["run", "--config", "tests/vitest.config.ts", "--reporter=default", "--reporter=json", `--outputFile=${report}`, ...vitestExtra]);
  let parsed: VitestReport | null = null;
  if (fs.existsSync(report)) {
    try {
      parsed = JSON.parse(fs.readFileSync(report, "utf8")) as VitestReport;
    } catch {
      parsed = null;
    }
    fs.rmSync(report, { force: true });
  }
  results.push({ kind: "vitest", name: "vitest", ...res, report: parsed });
}

const summary = summarize(results, (f) => path.relative(projectRoot, f));
summary.reasons.unshift(...setupProblems);
summary.failed += setupProblems.length;
console.log(`\n[test] total time ${((Date.now() - t0) / 1000).toFixed(1)} s`);
for (const line of summaryLines(summary)) console.log(line);
process.exit(summary.failed > 0 || summary.reasons.length > 0 ? 1 : 0);
