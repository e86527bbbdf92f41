// `npm test` : every suite, then one plain summary line `N passed, N failed`.
// Suites: typecheck (1 check), production build (1 check), vitest (unit, integration against a
// real PostgreSQL and mail sink, browser tests in Debian's chromium).
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { projectRoot } from "./lib/postgres";

const bin = (name: string) => path.join(projectRoot, "node_modules", ".bin", name);
const chromium = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
let passed = 0;
let failed = 0;

function step(name: string, cmd: string, args: string[]): boolean {
  console.log(`\n=== ${name}: ${path.basename(cmd)} ${args.join(" ")}`);
  const t0 = Date.now();
  const res = spawnSync(cmd, args, { cwd: projectRoot, stdio: "inherit" });
  const ok = res.status === 0;
  console.log(`=== ${name}: ${ok ? "passed" : "FAILED"} in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  return ok;
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

const t0 = Date.now();
ensureChromium();

for (const [name, args] of [
  ["typecheck", ["-c", `"${bin("react-router")}" typegen && "${bin("tsc")}"`]],
  ["build", ["-c", `"${bin("react-router")}" build`]],
] as const) {
  if (step(name, "sh", [...args])) passed++;
  else failed++;
}

const report = path.join(projectRoot, ".data", "vitest-report.json");
fs.mkdirSync(path.dirname(report), { recursive: true });
fs.rmSync(report, { force: true });
step("vitest", bin("vitest"), ["run", "--config", "tests/vitest.config.ts", "--reporter=default", "--reporter=json", `--outputFile=${report}`]);
if (fs.existsSync(report)) {
  const r = JSON.parse(fs.readFileSync(report, "utf8")) as { numPassedTests: number; numFailedTests: number; testResults: Array<{ status: string; name: string; message?: string }> };
  passed += r.numPassedTests;
  failed += r.numFailedTests;
  // A file that fails before its tests run (import error, failed setup) counts as one failure.
  for (const f of r.testResults) {
    if (f.status === "failed" && (f as { assertionResults?: unknown[] }).assertionResults?.length === 0) {
      failed++;
      console.log(`[test] ${path.relative(projectRoot, f.name)} failed before its tests ran: ${f.message ?? ""}`);
    }
  }
} else {
  failed++;
  console.log("[test] vitest wrote no report (it crashed or its setup failed)");
}

console.log(`\n[test] total time ${((Date.now() - t0) / 1000).toFixed(1)} s`);
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 ? 1 : 0);
