// POST /api/v1/inspections/{inspectionId}/retry: a failed inspection goes back in the queue.
import { json, route } from "@/lib/api/http";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { retryInspection } from "@/lib/pipeline/inspections";

export const runtime = "nodejs";

export const POST = route<{ inspectionId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  return json(await retryInspection(actor, parseId(params.inspectionId, "The inspection")));
});
