// GET: the findings of one inspection (boxes in mm, kind, ΔE00, up, crop image links).
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { listFindings } from "@/lib/pipeline/inspections";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request, ctx: { params: Promise<{ inspectionId: string }> }) {
  try {
    const actor = await requestActor(request);
    const findings = await listFindings(actor, parseId((await ctx.params).inspectionId, "The inspection"));
    return Response.json({ findings }, { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
