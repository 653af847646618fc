// GET: one crop image of a finding (artwork, scan or difference), streamed from storage after the policy check.
// Streaming through the app keeps the bucket private: no storage URL ever reaches the browser.
import { Readable } from "node:stream";
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse, notFound } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { cropKeyFor } from "@/lib/pipeline/inspections";
import type { CropKind } from "@/storage/keys";
import { getObjectStream } from "@/storage/objects";

export const runtime = "nodejs";
const KINDS: readonly CropKind[] = ["artwork", "scan", "difference"];

export async function GET(
  request: Request,
  ctx: { params: Promise<{ inspectionId: string; findingId: string; kind: string }> },
) {
  try {
    const actor = await requestActor(request);
    const params = await ctx.params;
    if (!KINDS.includes(params.kind as CropKind)) throw notFound("The crop image");
    const key = await cropKeyFor(
      actor,
      parseId(params.inspectionId, "The inspection"),
      parseId(params.findingId, "The finding"),
      params.kind as CropKind,
    );
    const body = Readable.toWeb(await getObjectStream(key)) as ReadableStream;
    return new Response(body, {
      headers: { "Content-Type": "image/png", "Cache-Control": "private, max-age=3600", "X-Content-Type-Options": "nosniff" },
    });
  } catch (error) {
    return errorResponse(error);
  }
}
