"use server";
// The customer form's actions; input is checked by lib/customers (the same schema the API uses).
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { protectedAction } from "@/lib/auth/action";
import { createCustomer, updateCustomer } from "@/lib/customers/customers";

const formFields = z.looseObject({});

export const createCustomerAction = protectedAction({ schema: formFields, action: "customer.manage" }, async (data, actor) => {
  const customer = await createCustomer(actor, data);
  revalidatePath("/customers");
  redirect(`/customers?saved=${encodeURIComponent(customer.name)}`);
});

export const updateCustomerAction = protectedAction({ schema: formFields, action: "customer.manage" }, async (data, actor) => {
  const customer = await updateCustomer(actor, Number(data.customerId), data);
  revalidatePath("/customers");
  redirect(`/customers?saved=${encodeURIComponent(customer.name)}`);
});
