import type { Metadata } from "next";
import { forbidden } from "next/navigation";
import { CustomerForm } from "@/components/customers/customer-form";
import { FormPage } from "@/components/ui/form-page";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";
import { getCustomer } from "@/lib/customers/customers";
import { loadForPage } from "@/lib/page-load";

export const metadata: Metadata = { title: "Edit customer" };

export default async function EditCustomerPage(props: { params: Promise<{ customerId: string }> }) {
  const actor = await requireActor();
  if (!can(actor, "customer.manage")) forbidden();
  const customer = await loadForPage((await props.params).customerId, (id) => getCustomer(actor, id));
  return (
    <FormPage backHref="/customers" backLabel="Customers" title={`Edit ${customer.name}`}>
      <CustomerForm customer={customer} />
    </FormPage>
  );
}
