import type { Metadata } from "next";
import Link from "next/link";
import { forbidden } from "next/navigation";
import { CustomersTable } from "@/components/customers/customers-table";
import { buttonClass } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Customers" };

export default async function CustomersPage(props: { searchParams: Promise<{ saved?: string }> }) {
  const actor = await requireActor();
  if (!can(actor, "customer.manage")) forbidden();
  const { saved } = await props.searchParams;
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold tracking-tight">Customers</h1>
          <p className="mt-1 text-sm text-ink-muted">The brand owners whose cartons the plant prints, and who is told when their sheets are signed off.</p>
        </div>
        <Link href="/customers/new" className={buttonClass}>
          New customer
        </Link>
      </div>
      {saved && <Notice tone="ok">Saved {saved}.</Notice>}
      <CustomersTable />
    </div>
  );
}
