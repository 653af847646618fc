import type { Metadata } from "next";
import Link from "next/link";
import { forbidden } from "next/navigation";
import { CustomerForm } from "@/components/customers/customer-form";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";

export const metadata: Metadata = { title: "New customer" };

export default async function NewCustomerPage() {
  const actor = await requireActor();
  if (!can(actor, "customer.manage")) forbidden();
  return (
    <div className="max-w-2xl space-y-6">
      <div>
        <Link href="/customers" className="text-sm text-accent hover:underline">
          ← Customers
        </Link>
        <h1 className="mt-2 text-2xl font-semibold tracking-tight">New customer</h1>
      </div>
      <div className="rounded-xl border border-rule bg-surface p-6 shadow-sm">
        <CustomerForm />
      </div>
    </div>
  );
}
