// Runs `npm run worker`'s entry as a real child process, so tests can kill it, restart it and read its log.
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "../../..");

export interface WorkerProcess {
  child: ChildProcess;
  log: string[];
  waitFor: (pattern: RegExp, timeoutMs?: number) => Promise<string>;
  stop: (signal?: NodeJS.Signals) => Promise<number | null>;
}

export function startWorker(extraEnv: Record<string, string> = {}): WorkerProcess {
  // node --import tsx (not the tsx CLI): the pid is the worker itself, so SIGKILL really kills the worker.
  const child = spawn(process.execPath, ["--import", "tsx", "worker/index.ts"], {
    cwd: root,
    env: { ...process.env, ...extraEnv },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const log: string[] = [];
  const waiters: { pattern: RegExp; resolve: (line: string) => void }[] = [];
  const onLine = (line: string) => {
    log.push(line);
    if (process.env.SHOW_WORKER_LOG) console.log(`[worker] ${line}`);
    for (const w of [...waiters]) {
      if (w.pattern.test(line)) {
        waiters.splice(waiters.indexOf(w), 1);
        w.resolve(line);
      }
    }
  };
  let buffered = "";
  const feed = (chunk: Buffer) => {
    buffered += chunk.toString();
    const lines = buffered.split("\n");
    buffered = lines.pop() ?? "";
    lines.forEach(onLine);
  };
  child.stdout!.on("data", feed);
  child.stderr!.on("data", feed);
  const exited = new Promise<number | null>((resolve) => child.on("exit", (code) => resolve(code)));
  return {
    child,
    log,
    waitFor(pattern, timeoutMs = 90_000) {
      const seen = log.find((l) => pattern.test(l));
      if (seen) return Promise.resolve(seen);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`worker did not log ${pattern} within ${timeoutMs} ms:\n${log.slice(-30).join("\n")}`)), timeoutMs);
        waiters.push({ pattern, resolve: (line) => (clearTimeout(timer), resolve(line)) });
      });
    },
    async stop(signal = "SIGTERM") {
      if (child.exitCode !== null || child.signalCode !== null) return child.exitCode;
      child.kill(signal);
      return exited;
    },
  };
}

export const maildev = {
  url: () => process.env.MAILDEV_URL ?? "http://127.0.0.1:1090",
  async messages(): Promise<{ subject: string; text: string; to: { address: string }[] }[]> {
    const res = await fetch(`${maildev.url()}/api/email`);
    return (await res.json()) as never;
  },
};

/**
 * Empty the pipeline's queues. The test database is created afresh per run while Redis keeps its jobs, so
 * old job ids ("inspection-1") would otherwise name rows of the new database.
 */
export async function emptyQueues(): Promise<void> {
  const { Queue } = await import("bullmq");
  const { QUEUE } = await import("@/lib/queue/queues");
  const { workerConnection } = await import("@/lib/queue/connection");
  const connection = workerConnection();
  for (const name of Object.values(QUEUE)) {
    const queue = new Queue(name, { connection });
    await queue.obliterate({ force: true });
    await queue.close();
  }
  connection.disconnect();
}
