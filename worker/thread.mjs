// Entry of a sandboxed processor thread. BullMQ starts worker threads with plain Node, which cannot load
// TypeScript: register tsx's loader first, then hand the job to the processor of its queue.
import { register } from "tsx/esm/api";

register();
const processors = {
  rasterise: () => import("./processors/rasterise.ts"),
  inspect: () => import("./processors/inspect.ts"),
};

export default async function process(job, token) {
  const load = processors[job.queueName];
  if (!load) throw new Error(`No processor for queue ${job.queueName}`);
  let run;
  try {
    ({ default: run } = await load());
  } catch (error) {
    // A module that failed to load stays failed in this thread: end the thread so BullMQ starts a fresh one.
    setTimeout(() => process.exit(1), 100);
    throw error;
  }
  return run(job, token);
}
