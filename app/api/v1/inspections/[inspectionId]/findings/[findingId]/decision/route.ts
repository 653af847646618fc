// POST /api/v1/inspections/{inspectionId}/findings/{findingId}/decision: accept or reject a finding (admin,
// reviewer), naming the finding's version seen; a stale version is a 409. Through lib/review.
import { json, readJson, route } from "@/lib/api/http";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { decideFinding } from "@/lib/review/decisions";
import { decideBody } from "@/lib/review/inputs";

export const runtime = "nodejs";

export const POST = route<{ inspectionId: string; findingId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const inspectionId = parseId(params.inspectionId, "The inspection");
  const findingId = parseId(params.findingId, "The finding");
  const body = await readJson(request, decideBody);
  return json(await decideFinding(actor, { inspectionId, findingId, ...body }));
});
