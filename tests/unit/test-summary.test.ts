// The verdict of `npm test` (scripts/lib/test-summary.ts): every way a suite can fail must make
// the run red and say why. The report shapes follow vitest's JSON reporter (numTotalTests,
// numPassedTests, numFailedTests, testResults[].assertionResults).
import { describe, expect, it } from "vitest";
import { firstErrorLine, summarize, summaryLines, type VitestReport } from "../../scripts/lib/test-summary";

const ok = (name: string) => ({ kind: "command" as const, name, status: 0 });
function report(p: number, f: number, files: VitestReport["testResults"] = [{ name: "a.test.ts", status: f ? "failed" : "passed", assertionResults: [{ status: f ? "failed" : "passed" }] }]): VitestReport {
  return { numTotalTests: p + f, numPassedTests: p, numFailedTests: f, testResults: files, success: f === 0 };
}

describe("summarize", () => {
  it("is green only when every step passed and tests ran", () => {
    const s = summarize([ok("typecheck"), ok("build"), { kind: "vitest", name: "vitest", status: 0, report: report(10, 0) }]);
    expect(s).toEqual({ passed: 12, failed: 0, skipped: 0, reasons: [] });
    expect(summaryLines(s).at(-1)).toBe("12 passed, 0 failed");
  });

  it("counts a failed typecheck or build as a failure with its reason", () => {
    const s = summarize([{ kind: "command", name: "typecheck", status: 2 }, ok("build"), { kind: "vitest", name: "vitest", status: 0, report: report(3, 0) }]);
    expect(s.failed).toBe(1);
    expect(s.reasons).toEqual(["typecheck exited with status 2"]);
  });

  it("counts a killed build", () => {
    const s = summarize([{ kind: "command", name: "build", status: null, signal: "SIGKILL" }]);
    expect(s.failed).toBe(1);
    expect(s.reasons[0]).toMatch(/killed by SIGKILL/);
  });

  it("counts vitest that wrote no report (crash or failed global setup)", () => {
    const s = summarize([{ kind: "vitest", name: "vitest", status: 1, report: null }]);
    expect(s.failed).toBe(1);
    expect(s.reasons[0]).toMatch(/wrote no report/);
  });

  it("counts vitest that exited non-zero with a report of zero failures (global setup or unhandled error)", () => {
    const s = summarize([{ kind: "vitest", name: "vitest", status: 1, report: report(5, 0) }]);
    expect(s.failed).toBe(1);
    expect(s.reasons[0]).toMatch(/no test was reported failed/);
  });

  it("counts a run with no test at all, even when vitest exited 0", () => {
    const s = summarize([{ kind: "vitest", name: "vitest", status: 0, report: { numTotalTests: 0, numPassedTests: 0, numFailedTests: 0, testResults: [] } }]);
    expect(s.failed).toBe(1);
    expect(s.reasons[0]).toMatch(/ran no test/);
  });

  it("counts each failing test", () => {
    const s = summarize([{ kind: "vitest", name: "vitest", status: 1, report: report(7, 2) }]);
    expect(s).toMatchObject({ passed: 7, failed: 2 });
    expect(s.reasons).toEqual(["vitest: 2 test(s) failed"]);
  });

  it("counts a file that failed before its tests ran, with its message", () => {
    const files = [
      { name: "/x/ok.test.ts", status: "passed", assertionResults: [{}] },
      { name: "/x/broken.test.ts", status: "failed", message: "Cannot find module 'y'\n  at ...", assertionResults: [] },
    ];
    const s = summarize([{ kind: "vitest", name: "vitest", status: 1, report: report(1, 0, files) }], (f) => f.replace("/x/", ""));
    expect(s.failed).toBe(1);
    expect(s.reasons).toEqual(["vitest: broken.test.ts failed before its tests ran: Cannot find module 'y'"]);
  });

  it("counts a file whose beforeAll failed, leaving its tests skipped", () => {
    const files = [{ name: "/x/matrix.test.ts", status: "failed", message: "AssertionError: expected undefined to be 302", assertionResults: [{ status: "skipped" }, { status: "skipped" }] }];
    const s = summarize([{ kind: "vitest", name: "vitest", status: 1, report: { ...report(0, 0, files), numTotalTests: 2, numPendingTests: 2 } }], (f) => f.replace("/x/", ""));
    expect(s.failed).toBe(1);
    expect(s.skipped).toBe(2);
    expect(s.reasons).toEqual(["vitest: matrix.test.ts failed before its tests ran: AssertionError: expected undefined to be 302"]);
  });

  it("repeats the reasons just above the last line", () => {
    const lines = summaryLines(summarize([{ kind: "command", name: "build", status: 1 }]));
    expect(lines).toEqual(["Why the run failed:", "- build exited with status 1", "0 passed, 1 failed"]);
  });
});

describe("firstErrorLine", () => {
  it("finds the first error in coloured output and quotes it in the reason", () => {
    const out = "RUN v4\n\u001b[31m\u001b[1mSequelizeConnectionRefusedError\u001b[22m: connect ECONNREFUSED 127.0.0.1:9\u001b[39m\n at x\n";
    const e = firstErrorLine(out);
    expect(e).toBe("SequelizeConnectionRefusedError: connect ECONNREFUSED 127.0.0.1:9");
    const s = summarize([{ kind: "vitest", name: "vitest", status: 1, firstError: e, report: { numTotalTests: 0, numPassedTests: 0, numFailedTests: 0, testResults: [] } }]);
    expect(s.reasons).toEqual(["vitest ran no test at all; first error: SequelizeConnectionRefusedError: connect ECONNREFUSED 127.0.0.1:9"]);
  });

  it("finds TypeScript errors", () => {
    expect(firstErrorLine("app/x.ts(3,1): error TS2304: Cannot find name 'y'.\n")).toBe("app/x.ts(3,1): error TS2304: Cannot find name 'y'.");
  });
});
