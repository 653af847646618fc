// Stopping and starting single test services for fault tests. Starting goes through scripts/services.sh
// (it starts whatever is not running, with the same data directory and ports).
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "../../..");
const dataDir = process.env.TYMPAN_DATA_DIR ?? path.join(root, ".data/test");
const runDir = path.join(dataDir, "run");

export function startMissingServices(): void {
  execFileSync("bash", ["scripts/services.sh", "start"], { cwd: root, env: { ...process.env, TYMPAN_DATA_DIR: dataDir, MAILDEV_WEB_PORT: process.env.MAILDEV_WEB_PORT ?? "1090" }, stdio: "ignore" });
}

const pidOf = (name: string) => Number(readFileSync(path.join(runDir, `${name}.pid`), "utf8").trim());
const alive = (pid: number) => {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
};

/** Stops one service the way a crash or an operator would, and waits until its process has gone. */
export async function stopService(name: "redis" | "s3rver" | "maildev"): Promise<void> {
  const pid = pidOf(name);
  process.kill(pid, "SIGTERM");
  for (let i = 0; i < 100 && alive(pid); i++) await new Promise((r) => setTimeout(r, 100));
}
