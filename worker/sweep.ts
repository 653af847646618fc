// Puts work the database knows about back on the queues. Job ids are deterministic, so work already queued or
// running is left as it is; only what Redis lost (an outage during an upload, a flushed Redis) is added.
import { unfinishedWork } from "@/lib/pipeline/records";
import { enqueueInspection, enqueueRasterise } from "@/lib/queue/queues";
import { env } from "@/lib/env";

export async function sweep(): Promise<number> {
  const work = await unfinishedWork();
  for (const r of work.rasters) await enqueueRasterise(r.id, r.dpi ?? env.ARTWORK_DPI);
  for (const id of work.inspections) await enqueueInspection(id);
  return work.rasters.length + work.inspections.length;
}
