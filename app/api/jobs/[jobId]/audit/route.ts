// GET ?kind&personId&page&pageSize: one page of the job's audit trail, newest first.
import { listJobAudit } from "@/lib/audit-trail";
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request, ctx: { params: Promise<{ jobId: string }> }) {
  try {
    const actor = await requestActor(request);
    const query = Object.fromEntries(new URL(request.url).searchParams);
    return Response.json(await listJobAudit(actor, parseId((await ctx.params).jobId, "The job"), query), { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
