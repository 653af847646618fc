// GET ?q&sort&dir&page&pageSize: one page of customers (admin, prepress).
import { requestActor } from "@/lib/auth/request-actor";
import { listCustomers } from "@/lib/customers/customers";
import { errorResponse } from "@/lib/errors";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export async function GET(request: Request) {
  try {
    const actor = await requestActor(request);
    return Response.json(await listCustomers(actor, Object.fromEntries(new URL(request.url).searchParams)), { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return errorResponse(error);
  }
}
