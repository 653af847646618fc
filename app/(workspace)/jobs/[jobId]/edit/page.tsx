import type { Metadata } from "next";
import Link from "next/link";
import { forbidden, notFound } from "next/navigation";
import { JobForm } from "@/components/jobs/job-form";
import { requireActor } from "@/lib/auth/session";
import { AppError } from "@/lib/errors";
import { getJob, jobFormOptions, type JobDetail } from "@/lib/jobs/jobs";

export const metadata: Metadata = { title: "Edit job" };

export default async function EditJobPage(props: { params: Promise<{ jobId: string }> }) {
  const params = await props.params;
  const actor = await requireActor();
  const jobId = Number(params.jobId);
  if (!Number.isSafeInteger(jobId) || jobId <= 0) notFound();
  let job: JobDetail;
  try {
    job = await getJob(actor, jobId);
  } catch (error) {
    if (error instanceof AppError && error.status === 404) notFound();
    throw error;
  }
  if (!job.may.update) forbidden();
  const options = await jobFormOptions(actor);
  return (
    <div className="max-w-3xl space-y-6">
      <div>
        <Link href={`/jobs/${job.id}`} className="text-sm text-accent hover:underline">
          ← {job.jobNumber}
        </Link>
        <h1 className="mt-2 text-2xl font-semibold tracking-tight">Edit job {job.jobNumber}</h1>
      </div>
      <div className="rounded-xl border border-rule bg-surface p-6 shadow-sm">
        {job.status === "completed" || job.status === "cancelled" ? (
          <p className="text-sm text-ink-muted">This job is closed and is no longer edited.</p>
        ) : (
          <JobForm job={job} options={options} />
        )}
      </div>
    </div>
  );
}
