// The three queues of the pipeline and how work is put on them. Job ids are deterministic (no ':' — BullMQ
// uses it as a separator), so enqueueing the same work twice is a no-op: the worker's start-up sweep and a
// user's upload may both enqueue one inspection without running it twice.
import { Queue, type JobsOptions } from "bullmq";
import type { Redis } from "ioredis";
import { producerConnection, whenReady } from "./connection";

export const QUEUE = { rasterise: "rasterise", inspect: "inspect", mail: "mail" } as const;

export interface RasteriseData {
  revisionId: number;
  /** Only the small preview image of the page (for a draft revision, before any comparison raster exists). */
  preview?: boolean;
}
export interface InspectData {
  inspectionId: number;
}
export type MailData =
  | { kind: "sheet_ready"; inspectionId: number }
  | { kind: "sheet_failed"; inspectionId: number; reason: "inspection_failed" | "verdict_failed" }
  | { kind: "sheet_signed"; inspectionId: number; signoffId: number };

const cpuJob: JobsOptions = {
  attempts: 3,
  backoff: { type: "exponential", delay: 5_000 },
  removeOnComplete: { age: 24 * 3600, count: 1000 },
  // Failed jobs stay (a week) so Retry can re-run the same job and its history stays visible.
  removeOnFail: { age: 7 * 24 * 3600 },
};
const mailJob: JobsOptions = {
  attempts: 10,
  backoff: { type: "exponential", delay: 10_000 },
  removeOnComplete: { age: 7 * 24 * 3600 },
  removeOnFail: { age: 30 * 24 * 3600 },
};

export const jobIds = {
  rasterise: (revisionId: number, dpi: number) => `raster-${revisionId}-${dpi}`,
  preview: (revisionId: number) => `preview-${revisionId}`,
  inspect: (inspectionId: number) => `inspection-${inspectionId}`,
  // The reason keeps a failed inspection's mail and a failed sign-off's (numbered by the signature) apart.
  mail: (data: MailData, run: number) => `mail-${data.kind}${"reason" in data ? `-${data.reason}` : ""}-${data.inspectionId}-${run}`,
};

interface Queues {
  connection: Redis;
  rasterise: Queue<RasteriseData>;
  inspect: Queue<InspectData>;
  mail: Queue<MailData>;
}
const globalForQueues = globalThis as unknown as { tympanQueues?: Queues };

export function queues(): Queues {
  if (!globalForQueues.tympanQueues) {
    const connection = producerConnection();
    connection.on("error", () => undefined); // reported where a command fails
    globalForQueues.tympanQueues = {
      connection,
      rasterise: new Queue(QUEUE.rasterise, { connection, defaultJobOptions: cpuJob }),
      inspect: new Queue(QUEUE.inspect, { connection, defaultJobOptions: cpuJob }),
      mail: new Queue(QUEUE.mail, { connection, defaultJobOptions: mailJob }),
    };
  }
  return globalForQueues.tympanQueues;
}

export async function closeQueues(): Promise<void> {
  const q = globalForQueues.tympanQueues;
  globalForQueues.tympanQueues = undefined;
  if (!q) return;
  await Promise.all([q.rasterise.close(), q.inspect.close(), q.mail.close()]);
  q.connection.disconnect();
}

/**
 * Make sure a job with this id is on its way. The database is the truth: a job kept as failed is retried in
 * place with fresh attempts (Retry button), a job kept as completed is removed and added again (the work is
 * wanted again), a waiting, delayed or active one is left alone.
 */
async function ensureJob<T>(queue: Queue<T>, name: string, data: T, jobId: string): Promise<void> {
  await whenReady(queues().connection);
  const existing = await queue.getJob(jobId);
  if (existing) {
    const state = await existing.getState();
    if (state === "failed") return existing.retry("failed", { resetAttemptsMade: true, resetAttemptsStarted: true });
    if (state !== "completed" && state !== "unknown") return;
    await existing.remove();
  }
  await (queue as Queue).add(name, data, { jobId });
}

export async function enqueueRasterise(revisionId: number, dpi: number): Promise<void> {
  await ensureJob(queues().rasterise, "rasterise", { revisionId }, jobIds.rasterise(revisionId, dpi));
}

export async function enqueuePreview(revisionId: number): Promise<void> {
  await ensureJob(queues().rasterise, "preview", { revisionId, preview: true }, jobIds.preview(revisionId));
}

export async function enqueueInspection(inspectionId: number): Promise<void> {
  await ensureJob(queues().inspect, "inspect", { inspectionId }, jobIds.inspect(inspectionId));
}

export async function enqueueMail(data: MailData, run: number): Promise<void> {
  await whenReady(queues().connection);
  await queues().mail.add(data.kind, data, { jobId: jobIds.mail(data, run) });
}
