// PUT {"areas": [{scope, label, x, y, w, h}]} (mm): replaces a draft revision's excluded areas (prepress).
import { requestActor } from "@/lib/auth/request-actor";
import { AppError, errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { setExcludedAreas } from "@/lib/pipeline/artworks";

export const runtime = "nodejs";

export async function PUT(request: Request, ctx: { params: Promise<{ revisionId: string }> }) {
  try {
    const actor = await requestActor(request);
    const body = await request.json().catch(() => {
      throw new AppError("bad_json", "The request body must be JSON: {\"areas\": [...]}.", 400);
    });
    return Response.json(await setExcludedAreas(actor, parseId((await ctx.params).revisionId, "The artwork revision"), body));
  } catch (error) {
    return errorResponse(error);
  }
}
