// GET /api/v1/inspections/{inspectionId}/findings: the findings, largest area first, a page at a time.
import { json, page, readQuery, route } from "@/lib/api/http";
import { PageQuery } from "@/lib/api/schemas";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { listFindings } from "@/lib/pipeline/inspections";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = route<{ inspectionId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const inspectionId = parseId(params.inspectionId, "The inspection");
  const query = readQuery(request, PageQuery);
  const findings = await listFindings(actor, inspectionId);
  return json(page(findings, (f) => [f.areaMm2, f.id], query.limit, query.cursor));
});
