// The verdict of `npm test`, as a pure function so each way a suite can fail is unit-tested.
// A run is green only when every step exited 0 and at least one test ran; anything else counts at
// least one failure and says why, because a runner that swallows a failed suite lands broken work.

export interface CommandStep {
  kind: "command";
  name: string;
  /** Exit status; null when the process was killed by a signal or could not start. */
  status: number | null;
  signal?: string | null;
  /** The first error line the step printed, quoted in the reason. */
  firstError?: string;
}

/** The subset of vitest's JSON reporter output that the verdict reads. */
export interface VitestReport {
  numTotalTests: number;
  numPassedTests: number;
  numFailedTests: number;
  numPendingTests?: number;
  numTodoTests?: number;
  success?: boolean;
  testResults: Array<{ name: string; status: string; message?: string; assertionResults?: unknown[] }>;
}

export interface VitestStep {
  kind: "vitest";
  name: string;
  status: number | null;
  signal?: string | null;
  firstError?: string;
  /** The parsed JSON report, or null when vitest wrote none (crash, failed global setup). */
  report: VitestReport | null;
}

export type StepResult = CommandStep | VitestStep;

export interface Summary {
  passed: number;
  failed: number;
  skipped: number;
  /** One line per reason the run is red; empty when green. */
  reasons: string[];
}

function exitText(status: number | null, signal?: string | null) {
  if (signal) return `was killed by ${signal}`;
  if (status === null) return "did not start";
  return `exited with status ${status}`;
}

const ANSI = /\u001b\[[0-9;]*m/g;

/** The first line of output that names an error ("TypeError: …", "error TS2304: …"), without colour codes. */
export function firstErrorLine(output: string): string | undefined {
  for (const raw of output.split("\n")) {
    const line = raw.replace(ANSI, "").trim();
    if (/^(\w*Error|error TS\d+|Error)\b.*:/.test(line) || /: error TS\d+:/.test(line)) return line.slice(0, 300);
  }
  return undefined;
}

const quoted = (e?: string) => (e ? `; first error: ${e}` : "");

export function summarize(steps: StepResult[], relativeName: (file: string) => string = (f) => f): Summary {
  let passed = 0;
  let failed = 0;
  let skipped = 0;
  const reasons: string[] = [];
  for (const step of steps) {
    const ok = step.status === 0 && !step.signal;
    if (step.kind === "command") {
      if (ok) passed++;
      else {
        failed++;
        reasons.push(`${step.name} ${exitText(step.status, step.signal)}${quoted(step.firstError)}`);
      }
      continue;
    }
    const r = step.report;
    if (!r) {
      failed++;
      reasons.push(`${step.name} ${exitText(step.status, step.signal)} and wrote no report (it crashed, or its global setup failed before any test ran)${quoted(step.firstError)}`);
      continue;
    }
    passed += r.numPassedTests;
    failed += r.numFailedTests;
    skipped += (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
    let counted = r.numFailedTests;
    if (r.numFailedTests > 0) reasons.push(`${step.name}: ${r.numFailedTests} test(s) failed`);
    // A file that fails outside its tests (import error, failed beforeAll) has no failed test to count.
    for (const f of r.testResults) {
      const failedInside = (f.assertionResults ?? []).some((a) => (a as { status?: string }).status === "failed");
      if (f.status === "failed" && !failedInside) {
        failed++;
        counted++;
        const why = (f.message ?? "").split("\n")[0].slice(0, 300);
        reasons.push(`${step.name}: ${relativeName(f.name)} failed before its tests ran${why ? `: ${why}` : ""}`);
      }
    }
    if (r.numTotalTests === 0) {
      failed++;
      counted++;
      reasons.push(
        step.firstError
          ? `${step.name} ran no test at all; first error: ${step.firstError}`
          : `${step.name} ran no test at all (no test files found, or every file was skipped)`,
      );
    }
    if (!ok && counted === 0) {
      // e.g. an unhandled error between tests, a failed global setup or teardown: vitest says
      // failure, the per-test counts do not.
      failed++;
      reasons.push(`${step.name} ${exitText(step.status, step.signal)} although no test was reported failed (an unhandled error, or a failed global setup or teardown)${quoted(step.firstError)}`);
    } else if (ok && r.success === false && counted === 0) {
      failed++;
      reasons.push(`${step.name} reported failure in its JSON report although it exited 0`);
    }
  }
  return { passed, failed, skipped, reasons };
}

export function summaryLines(s: Summary): string[] {
  const lines = s.reasons.length ? ["Why the run failed:", ...s.reasons.map((r) => `- ${r}`)] : [];
  lines.push(`${s.passed} passed, ${s.failed} failed${s.skipped ? `, ${s.skipped} skipped` : ""}`);
  return lines;
}
