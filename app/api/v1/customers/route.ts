// POST /api/v1/customers: a new customer (admin, prepress), through lib/customers.
import { json, route } from "@/lib/api/http";
import { readObject } from "@/lib/api/json-routes";
import { requestActor } from "@/lib/auth/request-actor";
import { createCustomer } from "@/lib/customers/customers";

export const runtime = "nodejs";

export const POST = route(async (request) => {
  const actor = await requestActor(request);
  return json(await createCustomer(actor, await readObject(request)), 201);
});
