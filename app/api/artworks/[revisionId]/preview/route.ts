// GET: a small PNG of the revision's first page, streamed from storage after the policy check (anyone who may
// read the job). 404 with code "preview_pending" while the worker is still making it.
import { Readable } from "node:stream";
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { previewKeyFor } from "@/lib/pipeline/artworks";
import { getObjectStream } from "@/storage/objects";

export const runtime = "nodejs";

export async function GET(request: Request, ctx: { params: Promise<{ revisionId: string }> }) {
  try {
    const actor = await requestActor(request);
    const key = await previewKeyFor(actor, parseId((await ctx.params).revisionId, "The artwork revision"));
    const body = Readable.toWeb(await getObjectStream(key)) as ReadableStream;
    return new Response(body, {
      headers: { "Content-Type": "image/png", "Cache-Control": "private, max-age=3600", "X-Content-Type-Options": "nosniff" },
    });
  } catch (error) {
    return errorResponse(error);
  }
}
