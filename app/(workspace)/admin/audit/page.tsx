import type { Metadata } from "next";
import { forbidden } from "next/navigation";
import { AuditTrail } from "@/components/audit/audit-trail";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Audit trail" };

export default async function PlantAuditPage() {
  const actor = await requireActor();
  if (!can(actor, "audit.read")) forbidden();
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">Audit trail</h1>
        <p className="mt-1 text-sm text-ink-muted">Everything recorded in the plant: people, customers, jobs, artwork, scans, decisions and sign-offs.</p>
      </div>
      <AuditTrail endpoint="/api/audit" label="Audit trail of the plant" />
    </div>
  );
}
