import type { Metadata } from "next";
import Link from "next/link";
import { forbidden, notFound } from "next/navigation";
import { CustomerForm } from "@/components/customers/customer-form";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";
import { getCustomer, type CustomerDetail } from "@/lib/customers/customers";
import { AppError } from "@/lib/errors";

export const metadata: Metadata = { title: "Edit customer" };

export default async function EditCustomerPage(props: { params: Promise<{ customerId: string }> }) {
  const actor = await requireActor();
  if (!can(actor, "customer.manage")) forbidden();
  const id = Number((await props.params).customerId);
  if (!Number.isSafeInteger(id) || id <= 0) notFound();
  let customer: CustomerDetail;
  try {
    customer = await getCustomer(actor, id);
  } catch (error) {
    if (error instanceof AppError && error.status === 404) notFound();
    throw error;
  }
  return (
    <div className="max-w-2xl space-y-6">
      <div>
        <Link href="/customers" className="text-sm text-accent hover:underline">
          ← Customers
        </Link>
        <h1 className="mt-2 text-2xl font-semibold tracking-tight">Edit {customer.name}</h1>
      </div>
      <div className="rounded-xl border border-rule bg-surface p-6 shadow-sm">
        <CustomerForm customer={customer} />
      </div>
    </div>
  );
}
