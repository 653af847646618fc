// GET: what waits for the signed-in person's role now (the home page's first panel).
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { whatNeedsMe } from "@/lib/jobs/attention";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request) {
  try {
    const actor = await requestActor(request);
    return Response.json({ sections: await whatNeedsMe(actor) }, { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
