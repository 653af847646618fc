// GET: everything the sheet page shows (geometry, tiles, findings with decisions, signatures, what the reader may do).
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { getSheetView } from "@/lib/review/sheet";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request, ctx: { params: Promise<{ inspectionId: string }> }) {
  try {
    const actor = await requestActor(request);
    const view = await getSheetView(actor, parseId((await ctx.params).inspectionId, "The sheet"));
    return Response.json(view, { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
