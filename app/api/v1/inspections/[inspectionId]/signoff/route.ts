// POST /api/v1/inspections/{inspectionId}/signoff: sign the sheet off as passed or failed (admin, reviewer), with
// the password re-entered and the signature's meaning. Through lib/review. Sign-off stays with qualified staff.
import { json, readJson, route } from "@/lib/api/http";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { signBody } from "@/lib/review/inputs";
import { signSheet } from "@/lib/review/signoff";

export const runtime = "nodejs";

export const POST = route<{ inspectionId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const inspectionId = parseId(params.inspectionId, "The inspection");
  return json(await signSheet(actor, { inspectionId, ...(await readJson(request, signBody)) }));
});
