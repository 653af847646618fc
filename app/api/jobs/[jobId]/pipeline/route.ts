// GET: artwork revisions, sheets and their inspections' live stage and percent (polled by the job page).
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { getJobPipeline } from "@/lib/pipeline/view";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request, ctx: { params: Promise<{ jobId: string }> }) {
  try {
    const actor = await requestActor(request);
    const view = await getJobPipeline(actor, parseId((await ctx.params).jobId, "The job"));
    return Response.json(view, { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
