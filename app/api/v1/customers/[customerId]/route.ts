// PATCH /api/v1/customers/{customerId}: change a customer's name or contact addresses (admin, prepress).
import { json, route } from "@/lib/api/http";
import { readObject } from "@/lib/api/json-routes";
import { requestActor } from "@/lib/auth/request-actor";
import { updateCustomer } from "@/lib/customers/customers";
import { parseId } from "@/lib/pipeline/access";

export const runtime = "nodejs";

export const PATCH = route<{ customerId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const customerId = parseId(params.customerId, "The customer");
  return json(await updateCustomer(actor, customerId, await readObject(request)));
});
