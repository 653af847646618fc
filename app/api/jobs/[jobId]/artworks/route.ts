// POST multipart/form-data with one file field (the artwork PDF): stores it as the job's next draft revision.
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { uploadArtwork } from "@/lib/pipeline/artworks";

export const runtime = "nodejs";

export async function POST(request: Request, ctx: { params: Promise<{ jobId: string }> }) {
  try {
    const actor = await requestActor(request);
    const jobId = parseId((await ctx.params).jobId, "The job");
    const result = await uploadArtwork(actor, jobId, request);
    return Response.json(result, { status: result.duplicate ? 200 : 201 });
  } catch (error) {
    return errorResponse(error);
  }
}
