// A fixed pool of worker threads (one per core) running bench/worker.ts jobs.
import { Worker } from "node:worker_threads";
import { growHeapBeforeMarking } from "../lib/imaging/heap";
import type { WorkerJob } from "./worker";

// As in the product's worker process.
growHeapBeforeMarking();

/** A job without its id (Omit distributed over the union). */
export type Job = WorkerJob extends infer J ? (J extends WorkerJob ? Omit<J, "id"> : never) : never;
type Reply = { id: number; ok: boolean; error?: string } & Record<string, unknown>;

export class Pool {
  private readonly workers: Worker[];
  private readonly pending = new Map<number, (r: Reply) => void>();
  private nextId = 1;

  constructor(size: number) {
    const boot = new URL("./boot.mjs", import.meta.url);
    const entry = new URL("./worker.ts", import.meta.url).href;
    this.workers = Array.from({ length: size }, () => {
      const w = new Worker(boot, { workerData: { entry } });
      w.on("message", (r: Reply) => {
        const done = this.pending.get(r.id);
        this.pending.delete(r.id);
        done?.(r);
      });
      w.on("error", (err) => {
        for (const done of this.pending.values()) done({ id: 0, ok: false, error: String(err) });
        this.pending.clear();
      });
      return w;
    });
  }

  get size(): number {
    return this.workers.length;
  }

  /** Runs a job on worker `index`. */
  run(index: number, job: Job): Promise<Reply> {
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.pending.set(id, (r) => (r.ok ? resolve(r) : reject(new Error(r.error))));
      this.workers[index].postMessage({ ...job, id });
    });
  }

  /** Runs every job, each worker taking the next one when free; results in job order. */
  async map(jobs: Job[]): Promise<Reply[]> {
    const results: Reply[] = new Array(jobs.length);
    let next = 0;
    await Promise.all(
      this.workers.map(async (_, w) => {
        while (next < jobs.length) {
          const i = next++;
          results[i] = await this.run(w, jobs[i]);
        }
      }),
    );
    return results;
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}
