// POST: sign the sheet off (passed or failed) with the password re-entered and the signature's meaning.
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { parseId } from "@/lib/pipeline/access";
import { readBody, signBody } from "@/lib/review/inputs";
import { signSheet } from "@/lib/review/signoff";

export const runtime = "nodejs";

export async function POST(request: Request, ctx: { params: Promise<{ inspectionId: string }> }) {
  try {
    const actor = await requestActor(request);
    const body = await readBody(request, signBody);
    return Response.json(await signSheet(actor, { inspectionId: parseId((await ctx.params).inspectionId, "The sheet"), ...body }));
  } catch (error) {
    return errorResponse(error);
  }
}
