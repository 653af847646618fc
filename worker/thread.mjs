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
  const { default: run } = await load();
  return run(job, token);
}
