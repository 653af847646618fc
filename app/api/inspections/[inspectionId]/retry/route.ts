// POST: put a failed inspection back in the queue (QA, admin).
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { retryInspection } from "@/lib/pipeline/inspections";

export const runtime = "nodejs";

export async function POST(request: Request, ctx: { params: Promise<{ inspectionId: string }> }) {
  try {
    const actor = await requestActor(request);
    return Response.json(await retryInspection(actor, parseId((await ctx.params).inspectionId, "The inspection")));
  } catch (error) {
    return errorResponse(error);
  }
}
