// GET /api/v1/inspections/{inspectionId}: status, progress, alignment, covered area and drift (poll until done).
import { json, route } from "@/lib/api/http";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { getInspection } from "@/lib/pipeline/inspections";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = route<{ inspectionId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  return json(await getInspection(actor, parseId(params.inspectionId, "The inspection")));
});
