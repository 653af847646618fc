// GET: one file of a sheet's deep-zoom pyramids (the .dzi description or a tile), streamed from storage after the
// policy check, so the bucket stays private. Tiles of one run never change (a new run gets a new prefix).
import { Readable } from "node:stream";
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse, notFound } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { tileKeyFor } from "@/lib/review/tiles";
import { getObjectStream } from "@/storage/objects";

export const runtime = "nodejs";

export async function GET(request: Request, ctx: { params: Promise<{ inspectionId: string; path: string[] }> }) {
  try {
    const actor = await requestActor(request);
    const params = await ctx.params;
    const { key, contentType } = await tileKeyFor(actor, parseId(params.inspectionId, "The sheet"), params.path.join("/"));
    const stream = await getObjectStream(key).catch((error) => {
      // A tile the pyramid never had (beyond its edge) is a plain 404, as a static DZI server would answer.
      if ((error as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode === 404) throw notFound("The tile");
      throw error;
    });
    const body = Readable.toWeb(stream) as ReadableStream;
    return new Response(body, {
      headers: { "Content-Type": contentType, "Cache-Control": "private, max-age=86400", "X-Content-Type-Options": "nosniff" },
    });
  } catch (error) {
    return errorResponse(error);
  }
}
