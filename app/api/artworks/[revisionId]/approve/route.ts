// POST: approve a draft artwork revision (prepress, admin); queues its rasterisation.
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { approveArtwork } from "@/lib/pipeline/artworks";

export const runtime = "nodejs";

export async function POST(request: Request, ctx: { params: Promise<{ revisionId: string }> }) {
  try {
    const actor = await requestActor(request);
    return Response.json(await approveArtwork(actor, parseId((await ctx.params).revisionId, "The artwork revision")));
  } catch (error) {
    return errorResponse(error);
  }
}
