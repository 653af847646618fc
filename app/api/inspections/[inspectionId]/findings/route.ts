// GET: the findings of one inspection (boxes in mm, kind, ΔE00, up, crop image links).
import { actorOrThrow } from "@/lib/auth/session";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { listFindings } from "@/lib/pipeline/inspections";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(_request: Request, ctx: { params: Promise<{ inspectionId: string }> }) {
  try {
    const actor = await actorOrThrow();
    const findings = await listFindings(actor, parseId((await ctx.params).inspectionId, "The inspection"));
    return Response.json({ findings }, { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
