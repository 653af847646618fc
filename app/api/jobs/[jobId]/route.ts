// GET: one job's details and what the actor may change (a job of another customer is 404).
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { getJob } from "@/lib/jobs/jobs";
import { parseId } from "@/lib/pipeline/access";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request, ctx: { params: Promise<{ jobId: string }> }) {
  try {
    const actor = await requestActor(request);
    return Response.json(await getJob(actor, parseId((await ctx.params).jobId, "The job")), { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
