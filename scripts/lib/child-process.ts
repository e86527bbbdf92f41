// Stopping a child process the scripts and tests started: SIGTERM, SIGKILL if it has not gone
// after a grace period, and a promise of its exit, so the next server started can take the port.
import type { ChildProcess } from "node:child_process";

export function stopChild(child: ChildProcess, graceMs = 5000): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    child.once("exit", () => resolve());
    child.kill("SIGTERM");
    setTimeout(() => child.kill("SIGKILL"), graceMs).unref();
  });
}
