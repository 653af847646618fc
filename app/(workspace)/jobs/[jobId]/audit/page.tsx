import type { Metadata } from "next";
import Link from "next/link";
import { AuditTrail } from "@/components/audit/audit-trail";
import { requireActor } from "@/lib/auth/session";
import { getJob } from "@/lib/jobs/jobs";
import { loadForPage } from "@/lib/page-load";

export const metadata: Metadata = { title: "Job audit trail" };

// Whoever may read the job reads its trail: it is the job's record for the customer and for auditors.
export default async function JobAuditPage(props: { params: Promise<{ jobId: string }> }) {
  const actor = await requireActor();
  const job = await loadForPage((await props.params).jobId, (id) => getJob(actor, id));
  return (
    <div className="space-y-6">
      <div>
        <Link href={`/jobs/${job.id}`} className="text-sm text-accent hover:underline">
          ← {job.jobNumber} {job.title}
        </Link>
        <h1 className="mt-2 text-2xl font-semibold tracking-tight">Audit trail of {job.jobNumber}</h1>
        <p className="mt-1 text-sm text-ink-muted">{job.customerName} · the job, its artwork revisions, scans, findings and sign-offs.</p>
      </div>
      <AuditTrail endpoint={`/api/jobs/${job.id}/audit`} label={`Audit trail of job ${job.jobNumber}`} />
    </div>
  );
}
