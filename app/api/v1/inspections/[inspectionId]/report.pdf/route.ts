// GET /api/v1/inspections/{inspectionId}/report.pdf: the sheet report (another customer's sheet is a 404).
import { route } from "@/lib/api/http";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { pdfResponse } from "@/lib/reports/response";
import { sheetReport } from "@/lib/reports/sheet-report";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = route<{ inspectionId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  return pdfResponse(await sheetReport(actor, parseId(params.inspectionId, "The sheet")));
});
