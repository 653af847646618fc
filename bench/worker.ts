// One benchmark worker thread: builds simulated sheets and inspects them with the engine's entry point.
import { parentPort } from "node:worker_threads";
import sharp from "sharp";
import { inspectSheet } from "../lib/imaging/inspect";
import { getProfile } from "../lib/imaging/profiles";
import type { InspectionResult } from "../lib/imaging/types";
import { makeSheet, score, type BenchSheet, type SheetSpec } from "./sheets";

export type WorkerJob =
  | { type: "sheet"; id: number; spec: SheetSpec; profile: string }
  | { type: "prepare"; id: number; specs: SheetSpec[]; profile: string }
  | { type: "repeat"; id: number; count: number };

// As in the product's worker: the sheets run in parallel threads, so libvips keeps to one thread a call
// instead of every call reaching for every core.
sharp.concurrency(1);

/** The sheets of one simulated press run (one artwork), inspected in turn by "repeat". */
let prepared: { sheets: BenchSheet[]; profile: string } | null = null;

/** The full engine, alignment included, exactly as the worker and the CLI call it. */
async function inspect(s: BenchSheet, profileName: string): Promise<{ result: InspectionResult; ms: number }> {
  const profile = getProfile(profileName);
  profile.excludedAreasMm.push(...s.excludedMm);
  const started = performance.now();
  const result = await inspectSheet({ artwork: s.artwork, scan: s.sheet.scan, profile, ups: s.layout.ups });
  return { result, ms: performance.now() - started };
}

parentPort!.on("message", async (job: WorkerJob) => {
  try {
    if (job.type === "sheet") {
      const sheet = await makeSheet(job.spec);
      const { result, ms } = await inspect(sheet, job.profile);
      parentPort!.postMessage({ id: job.id, ok: true, ms, timings: result.timingsMs, score: score(result.findings, sheet.sheet.truth, sheet.backgrounds) });
    } else if (job.type === "prepare") {
      const sheets: BenchSheet[] = [];
      for (const spec of job.specs) sheets.push(await makeSheet(spec));
      prepared = { sheets, profile: job.profile };
      for (const sheet of sheets) await inspect(sheet, prepared.profile); // warm-up: compiles the hot loops
      parentPort!.postMessage({ id: job.id, ok: true });
    } else {
      const times: number[] = [];
      const { sheets, profile } = prepared!;
      for (let i = 0; i < job.count; i++) times.push((await inspect(sheets[i % sheets.length], profile)).ms);
      parentPort!.postMessage({ id: job.id, ok: true, times });
    }
  } catch (err) {
    parentPort!.postMessage({ id: job.id, ok: false, error: (err as Error).stack ?? String(err) });
  }
});
