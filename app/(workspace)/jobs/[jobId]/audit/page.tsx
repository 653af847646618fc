import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { AuditTrail } from "@/components/audit/audit-trail";
import { requireActor } from "@/lib/auth/session";
import { AppError } from "@/lib/errors";
import { getJob, type JobDetail } from "@/lib/jobs/jobs";

export const metadata: Metadata = { title: "Job audit trail" };

// Whoever may read the job reads its trail: it is the job's record for the customer and for auditors.
export default async function JobAuditPage(props: { params: Promise<{ jobId: string }> }) {
  const actor = await requireActor();
  const jobId = Number((await props.params).jobId);
  if (!Number.isSafeInteger(jobId) || jobId <= 0) notFound();
  let job: JobDetail;
  try {
    job = await getJob(actor, jobId);
  } catch (error) {
    if (error instanceof AppError && error.status === 404) notFound();
    throw error;
  }
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
