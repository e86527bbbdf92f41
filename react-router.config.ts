import type { Config } from "@react-router/dev/config";
import path from "node:path";
import { build } from "vite";

export default {
  ssr: true,
  future: {
    v8_middleware: true,
    v8_passThroughRequests: true,
    v8_splitRouteModules: true,
    v8_trailingSlashAwareDataRequests: true,
    v8_viteEnvironmentApi: true,
  },
  // The compute pool's worker thread (app/.server/compute/) is a file of its own, loaded by
  // piscina beside the server bundle: build/server/compute-worker.js, packages left to node_modules
  // as in the server bundle.
  async buildEnd({ reactRouterConfig, viteConfig }) {
    await build({
      configFile: false,
      root: viteConfig.root,
      logLevel: "warn",
      resolve: { alias: { "~": path.resolve(viteConfig.root, "app") } },
      build: {
        ssr: path.resolve(viteConfig.root, "app/.server/compute/worker.server.ts"),
        outDir: path.resolve(reactRouterConfig.buildDirectory, "server"),
        emptyOutDir: false,
        copyPublicDir: false,
        rollupOptions: { output: { format: "es", entryFileNames: "compute-worker.js" } },
      },
    });
  },
} satisfies Config;
