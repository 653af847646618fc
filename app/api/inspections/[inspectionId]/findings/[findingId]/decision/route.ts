// POST: accept or reject a finding, naming the version seen. DELETE: undo the decision (until sign-off).
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { decideFinding, undoDecision } from "@/lib/review/decisions";
import { reviewErrorResponse } from "@/lib/review/http";
import { decideBody, readBody, undoBody } from "@/lib/review/inputs";

export const runtime = "nodejs";
type Ctx = { params: Promise<{ inspectionId: string; findingId: string }> };

async function ids(ctx: Ctx) {
  const p = await ctx.params;
  return { inspectionId: parseId(p.inspectionId, "The sheet"), findingId: parseId(p.findingId, "The finding") };
}

export async function POST(request: Request, ctx: Ctx) {
  try {
    const actor = await requestActor(request);
    const body = await readBody(request, decideBody);
    return Response.json(await decideFinding(actor, { ...(await ids(ctx)), ...body }));
  } catch (error) {
    return reviewErrorResponse(error);
  }
}

export async function DELETE(request: Request, ctx: Ctx) {
  try {
    const actor = await requestActor(request);
    const body = await readBody(request, undoBody);
    return Response.json(await undoDecision(actor, { ...(await ids(ctx)), ...body }));
  } catch (error) {
    return reviewErrorResponse(error);
  }
}
