// POST {"status": "on_press" | "completed" | "cancelled"}: moves the job along an allowed transition.
import { requestActor } from "@/lib/auth/request-actor";
import { AppError, errorResponse } from "@/lib/errors";
import { changeJobStatus } from "@/lib/jobs/jobs";
import { parseId } from "@/lib/pipeline/access";

export const runtime = "nodejs";

export async function POST(request: Request, ctx: { params: Promise<{ jobId: string }> }) {
  try {
    const actor = await requestActor(request);
    const body = await request.json().catch(() => {
      throw new AppError("bad_json", "The request body must be JSON, e.g. {\"status\":\"on_press\"}.", 400);
    });
    return Response.json(await changeJobStatus(actor, parseId((await ctx.params).jobId, "The job"), body));
  } catch (error) {
    return errorResponse(error);
  }
}
