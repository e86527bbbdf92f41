// Browser-test harness: the built app (`npm run serve`'s server, scripts/serve.ts) against the test database, the
// chromium flags for this sandbox, and signing in through the real form.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { stopChild } from "../../scripts/lib/child-process";
import { chromium, type Browser, type Page } from "playwright-core";
import fs from "node:fs";
import path from "node:path";
import { testEnv, TEST_APP_PORT } from "../setup/test-env";

const root = path.resolve(import.meta.dirname, "..", "..");
const bin = (name: string) => path.join(root, "node_modules", ".bin", name);

export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
// Flags for a sandboxed machine with no outside network (see DEVELOPERS.md).
export const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

/**
 * The built app as `npm run serve` runs it. `extraEnv` overrides the test environment (a test of
 * the server itself may run a second one on `PORT`); `output()` is what it has printed so far.
 */
export async function startAppServer(extraEnv: Record<string, string> = {}): Promise<{ url: string; stop: () => Promise<void>; output: () => string }> {
  if (!fs.existsSync(path.join(root, "build", "server", "index.js"))) {
    const build = spawnSync(bin("react-router"), ["build"], { cwd: root, encoding: "utf8" });
    if (build.status !== 0) throw new Error(`react-router build failed:\n${build.stderr}`);
  }
  // LOG_LEVEL=warn: the request log of a whole browser test would drown a failure's output.
  // NODE_ENV is left to the server, as under `npm start` and `npm run serve` (vitest's "test" is dropped).
  const { NODE_ENV: _vitestMode, ...inherited } = process.env;
  const env = { ...inherited, ...testEnv, PORT: String(TEST_APP_PORT), HOST: "127.0.0.1", SESSION_COOKIE_SECURE: "0", LOG_LEVEL: "warn", ...extraEnv };
  const child: ChildProcess = spawn(bin("tsx"), ["scripts/serve.ts"], { cwd: root, env, stdio: ["ignore", "pipe", "pipe"] });
  let output = "";
  child.stdout!.on("data", (c) => (output += c));
  child.stderr!.on("data", (c) => (output += c));
  const url = `http://127.0.0.1:${env.PORT}`;
  // Up to 60 s: on a busy machine (a full suite beside other work) the first answer can take 20 s.
  for (let i = 0; i < 300; i++) {
    try {
      const res = await fetch(`${url}/sign-in`);
      if (res.ok) return { url, stop: () => stopChild(child), output: () => output };
    } catch {
      /* not up yet */
    }
    if (child.exitCode !== null) break;
    await new Promise((r) => setTimeout(r, 200));
  }
  child.kill("SIGTERM");
  throw new Error(`the app server did not start on ${url}:\n${output}`);
}

export type AppServer = Awaited<ReturnType<typeof startAppServer>>;

/** The built app and Debian's chromium, as every browser test file starts them in beforeAll. */
export async function startBrowserApp(): Promise<{ server: AppServer; browser: Browser }> {
  const server = await startAppServer();
  const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS });
  return { server, browser };
}

/** Their end in afterAll (either may be missing when beforeAll failed). */
export async function stopBrowserApp(server: AppServer | undefined, browser: Browser | undefined) {
  await browser?.close();
  await server?.stop();
}

/** Fills and submits the sign-in form on the current page. */
export async function signIn(page: Page, email: string, password: string) {
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
}

/** A browser context signed in with a session cookie made in-process (see tests/integration/helpers). */
export async function contextWithCookie(browser: import("playwright-core").Browser, baseUrl: string, cookie: string | null, viewport = { width: 1280, height: 900 }) {
  // bypassCSP: axe-core is injected as an inline script, which the app's CSP (rightly) refuses.
  const context = await browser.newContext({ viewport, bypassCSP: true });
  if (cookie) {
    const eq = cookie.indexOf("=");
    await context.addCookies([{ name: cookie.slice(0, eq), value: cookie.slice(eq + 1), url: baseUrl }]);
  }
  return context;
}

const AXE_PATH = path.join(root, "node_modules", "axe-core", "axe.min.js");

/** axe-core's serious and critical violations on the page as it is now, as readable lines. */
export async function seriousAxeViolations(page: Page): Promise<string[]> {
  await page.addScriptTag({ path: AXE_PATH });
  const violations = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<{ violations: Array<{ id: string; impact: string; help: string; nodes: Array<{ target: string[] }> }> }> } }).axe;
    const result = await axe.run(document, {});
    if (!(result as unknown as { passes: unknown[] }).passes.length) throw new Error("axe-core ran no checks");
    return result.violations.filter((v) => v.impact === "serious" || v.impact === "critical").map((v) => `${v.impact} ${v.id}: ${v.help} (${v.nodes.slice(0, 3).map((n) => n.target.join(" ")).join("; ")})`);
  });
  return violations;
}

/** Sideways overflow of the page, in CSS pixels (0 when it fits its width). */
export function horizontalOverflow(page: Page): Promise<number> {
  return page.evaluate(() => Math.max(document.documentElement.scrollWidth, document.body.scrollWidth) - window.innerWidth);
}

/** The smallest text size in the page's SVG plots as drawn on screen, in CSS pixels (Infinity without plots). */
export function smallestPlotText(page: Page): Promise<number> {
  return page.evaluate(() => {
    let smallest = Infinity;
    for (const svg of document.querySelectorAll("svg")) {
      const vb = (svg as SVGSVGElement).viewBox.baseVal;
      const scale = vb && vb.width ? svg.getBoundingClientRect().width / vb.width : 1;
      for (const t of svg.querySelectorAll("text")) smallest = Math.min(smallest, parseFloat(getComputedStyle(t).fontSize) * scale);
    }
    return smallest;
  });
}
