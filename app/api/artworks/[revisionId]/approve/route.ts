// POST: approve a draft artwork revision (prepress, admin); queues its rasterisation.
import { actorOrThrow } from "@/lib/auth/session";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { approveArtwork } from "@/lib/pipeline/artworks";

export const runtime = "nodejs";

export async function POST(_request: Request, ctx: { params: Promise<{ revisionId: string }> }) {
  try {
    const actor = await actorOrThrow();
    return Response.json(await approveArtwork(actor, parseId((await ctx.params).revisionId, "The artwork revision")));
  } catch (error) {
    return errorResponse(error);
  }
}
