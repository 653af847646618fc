// GET ?kind&personId&page&pageSize: one page of the whole plant's audit trail (administrators), newest first.
import { listPlantAudit } from "@/lib/audit-trail";
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request) {
  try {
    const actor = await requestActor(request);
    return Response.json(await listPlantAudit(actor, Object.fromEntries(new URL(request.url).searchParams)), { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
