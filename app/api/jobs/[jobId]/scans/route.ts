// POST multipart/form-data: one or more scan files (field "file"), optional "sheetNumber" (one file) or
// "sheetNumber.<file name>", optional "profile" (tolerance profile name) and "dpi". Queues one inspection each.
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { uploadScans } from "@/lib/pipeline/scans";

export const runtime = "nodejs";

export async function POST(request: Request, ctx: { params: Promise<{ jobId: string }> }) {
  try {
    const actor = await requestActor(request);
    const jobId = parseId((await ctx.params).jobId, "The job");
    const result = await uploadScans(actor, jobId, request);
    return Response.json(result, { status: result.items.some((i) => !i.duplicate) ? 201 : 200 });
  } catch (error) {
    return errorResponse(error);
  }
}
