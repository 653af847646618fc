// `npm run worker`: the background pipeline as its own process. Any number of these may run on any number of
// hosts against one Redis, MariaDB and bucket. CPU-heavy work (rasterise, inspect) runs in worker threads so
// this process's event loop keeps renewing job locks; mail runs here (I/O only).
import path from "node:path";
import { Worker, type Job } from "bullmq";
import { closeDb } from "@/db/client";
import { env } from "@/lib/env";
import { growHeapBeforeMarking } from "@/lib/imaging/heap";
import { closeMailTransport } from "@/lib/mail/transport";
import { failInspection } from "@/lib/pipeline/records";
import { workerConnection } from "@/lib/queue/connection";
import { QUEUE, closeQueues, enqueueMail, type InspectData, type MailData, type RasteriseData } from "@/lib/queue/queues";
import { ensureBucket } from "@/storage/objects";
import { sendPipelineMail } from "./mail";
import { sweep } from "./sweep";

const threadEntry = path.join(import.meta.dirname, "thread.mjs");
growHeapBeforeMarking();
const log = (line: string) => console.log(`${new Date().toISOString()} ${line}`);

// A killed worker's job is taken over once its lock lapses; a job found stalled twice more is failed.
const lockOptions = { lockDuration: env.WORKER_LOCK_MS, stalledInterval: Math.max(1000, Math.floor(env.WORKER_LOCK_MS / 2)), maxStalledCount: 2 };

function cpuWorker<T>(queue: string, concurrency: number) {
  return new Worker<T>(queue, threadEntry, {
    connection: workerConnection(),
    concurrency,
    useWorkerThreads: true,
    ...lockOptions,
  });
}

const isFinalFailure = (job: Job | undefined, error: Error) =>
  !!job && (error.name === "UnrecoverableError" || job.attemptsMade >= (job.opts.attempts ?? 1));

/** How long a stopping worker may spend finishing its jobs: longer than one B1 sheet at 300 dpi takes. */
const SHUTDOWN_GRACE_MS = 90_000;

async function main() {
  await ensureBucket();
  const rasterise = cpuWorker<RasteriseData>(QUEUE.rasterise, 1);
  const inspect = cpuWorker<InspectData>(QUEUE.inspect, env.WORKER_CONCURRENCY);
  const mail = new Worker<MailData>(QUEUE.mail, sendPipelineMail, { connection: workerConnection(), concurrency: 4, ...lockOptions });
  const workers = [rasterise, inspect, mail];

  inspect.on("active", (job) => log(`inspection ${job.data.inspectionId}: started (attempt ${job.attemptsStarted})`));
  inspect.on("completed", (job, result) => log(`inspection ${job.data.inspectionId}: done, ${JSON.stringify(result?.findings ?? "no change")} findings`));
  inspect.on("failed", async (job, error) => {
    log(`inspection ${job?.data.inspectionId}: attempt failed: ${error.message}`);
    // Bad input was recorded by the processor in plain words; here only the end of retries for other causes.
    if (job && error.name !== "UnrecoverableError" && isFinalFailure(job, error)) {
      const id = job.data.inspectionId;
      // The technical detail goes to this log; people get plain words.
      log(`inspection ${id}: giving up after ${job.attemptsMade} attempts: ${error.stack ?? error.message}`);
      await failInspection(
        id,
        "inspection_error",
        `The inspection stopped after ${job.attemptsMade} attempts because of a problem on our side, not with the scan. Press Retry; if it fails again, tell an administrator.`,
      ).catch((e) => log(`recording the failure of inspection ${id} failed: ${e}`));
      await enqueueMail({ kind: "sheet_failed", inspectionId: id, reason: "inspection_failed" }, job.attemptsMade).catch(() => undefined);
    }
  });
  rasterise.on("completed", (job) => log(`artwork revision ${job.data.revisionId}: rasterised`));
  rasterise.on("failed", (job, error) => log(`artwork revision ${job?.data.revisionId}: rasterising failed: ${error.message}`));
  mail.on("completed", (job, result) => log(`mail ${job.id}: sent to ${result.sent}`));
  mail.on("failed", (job, error) => log(`mail ${job?.id}: not sent yet (${error.message}); will retry`));
  // While Redis is away every reconnect attempt fails: say so once per ten seconds, not on every try.
  const lastSaid = new Map<string, number>();
  for (const w of workers) {
    w.on("error", (error) => {
      const key = `${w.name}: ${error.message}`;
      if (Date.now() - (lastSaid.get(key) ?? 0) < 10_000) return;
      lastSaid.set(key, Date.now());
      log(key);
    });
  }

  // Work recorded in the database but missing from Redis (Redis was down, or emptied) is queued again.
  const runSweep = () => sweep().then((n) => n > 0 && log(`sweep: ${n} unfinished items checked against the queues`)).catch((e) => log(`sweep failed: ${e.message}`));
  await runSweep();
  const sweepTimer = setInterval(runSweep, 60_000);
  log(`worker ready (inspection concurrency ${env.WORKER_CONCURRENCY}, pid ${process.pid})`);

  let stopping = false;
  const stop = async (signal: string) => {
    // One signal often arrives twice (the terminal's Ctrl-C and the demo script's kill, relayed by tsx): repeats
    // are ignored. close() waits for the jobs in progress and hangs while Redis is unreachable, so a grace
    // period bounds it; the stalled-job check then hands the unfinished jobs to another worker.
    if (stopping) return;
    stopping = true;
    log(`${signal}: finishing active jobs, then stopping (at most ${SHUTDOWN_GRACE_MS / 1000} s)`);
    clearInterval(sweepTimer);
    setTimeout(() => {
      log("grace period over: stopping with jobs unfinished; they will be taken up again");
      process.exit(1);
    }, SHUTDOWN_GRACE_MS).unref();
    await Promise.all(workers.map((w) => w.close()));
    await closeQueues();
    closeMailTransport();
    await closeDb();
    log("worker stopped");
    process.exit(0);
  };
  process.on("SIGTERM", () => void stop("SIGTERM"));
  process.on("SIGINT", () => void stop("SIGINT"));
}

main().catch((error) => {
  console.error("The worker could not start:", error);
  process.exit(1);
});
