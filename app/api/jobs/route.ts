// GET ?q&status&customerId&sort&dir&page&pageSize: one page of the jobs the actor may see.
import { requestActor } from "@/lib/auth/request-actor";
import { errorResponse } from "@/lib/errors";
import { listJobs } from "@/lib/jobs/jobs";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request) {
  try {
    const actor = await requestActor(request);
    const query = Object.fromEntries(new URL(request.url).searchParams);
    return Response.json(await listJobs(actor, query), { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
