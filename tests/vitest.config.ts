// Vitest config kept apart from vite.config.ts: the reactRouter() plugin must not load in tests.
import { defineConfig } from "vitest/config";
import path from "node:path";
import { testEnv } from "./setup/test-env.ts";

const root = path.resolve(import.meta.dirname, "..");
const alias = { "~": path.join(root, "app") };

export default defineConfig({
  root,
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: "unit",
          root,
          include: ["app/**/*.test.ts", "tests/unit/**/*.test.ts"],
          environment: "node",
        },
      },
      {
        resolve: { alias },
        test: {
          name: "integration",
          root,
          include: ["tests/integration/**/*.test.ts", "tests/browser/**/*.test.ts"],
          environment: "node",
          globalSetup: [path.join(root, "tests/setup/global.ts")],
          env: testEnv,
          fileParallelism: false,
          testTimeout: 30000,
          hookTimeout: 120000,
        },
      },
    ],
  },
});
