// The real runner (scripts/test.ts), run on small selections: it must go red when vitest's
// global setup cannot reach the database, and when vitest finds no test file; green when the
// selected tests pass. Spawns processes, so it lives under tests/unit/ like the fit command test.
import { describe, expect, it } from "vitest";
import { spawnSync } from "node:child_process";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "..", "..");
// Nothing listens on port 9 (discard) on loopback here: the setup's first query fails at once.
const unreachable = "postgres://ratebook@127.0.0.1:9/ratebook_unreachable";

function runner(vitestArgs: string[]) {
  const env: NodeJS.ProcessEnv = {};
  for (const [k, v] of Object.entries(process.env)) if (!k.startsWith("VITEST") && k !== "NODE_ENV" && k !== "TEST") env[k] = v;
  env.TEST_DATABASE_URL = unreachable;
  delete env.DATABASE_URL;
  const res = spawnSync("npx", ["tsx", "scripts/test.ts", "--steps", "vitest", "--", ...vitestArgs], { cwd: root, env, encoding: "utf8", timeout: 120000 });
  const lines = res.stdout.trim().split("\n");
  return { status: res.status, last: lines.at(-1) ?? "", tail: lines.slice(-6).join("\n") };
}

describe("npm test runner (scripts/test.ts)", { timeout: 120000 }, () => {
  it("fails, counts a failure and says why when the database setup fails", () => {
    const r = runner(["--project", "integration", "tests/integration/sign-in.test.ts"]);
    expect(r.status).not.toBe(0);
    expect(r.last).toMatch(/^\d+ passed, [1-9]\d* failed$/);
    expect(r.tail).toMatch(/Why the run failed:/);
    expect(r.tail).toMatch(/vitest.*ECONNREFUSED/);
  });

  it("fails when vitest finds no test file", () => {
    const r = runner(["--project", "unit", "tests/unit/no-such-file-here"]);
    expect(r.status).not.toBe(0);
    expect(r.last).toMatch(/^0 passed, [1-9]\d* failed$/);
  });

  it("passes when the selected tests pass", () => {
    const r = runner(["--project", "unit", "tests/unit/navigation.test.ts"]);
    expect(r.last).toMatch(/^[1-9]\d* passed, 0 failed$/);
    expect(r.status).toBe(0);
  });
});
