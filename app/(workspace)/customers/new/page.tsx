import type { Metadata } from "next";
import { forbidden } from "next/navigation";
import { CustomerForm } from "@/components/customers/customer-form";
import { FormPage } from "@/components/ui/form-page";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";

export const metadata: Metadata = { title: "New customer" };

export default async function NewCustomerPage() {
  const actor = await requireActor();
  if (!can(actor, "customer.manage")) forbidden();
  return (
    <FormPage backHref="/customers" backLabel="Customers" title="New customer">
      <CustomerForm />
    </FormPage>
  );
}
