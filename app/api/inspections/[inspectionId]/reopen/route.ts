// POST: reopen a signed sheet (administrators), with a reason kept beside the signature.
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { readBody, reopenBody } from "@/lib/review/inputs";
import { reopenSheet } from "@/lib/review/signoff";

export const runtime = "nodejs";

export async function POST(request: Request, ctx: { params: Promise<{ inspectionId: string }> }) {
  try {
    const actor = await requestActor(request);
    const body = await readBody(request, reopenBody);
    await reopenSheet(actor, { inspectionId: parseId((await ctx.params).inspectionId, "The sheet"), reason: body.reason });
    return Response.json({ reopened: true });
  } catch (error) {
    return errorResponse(error);
  }
}
