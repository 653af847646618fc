import type { Metadata } from "next";
import Link from "next/link";
import { JobDetails } from "@/components/jobs/job-details";
import { JobPipeline } from "@/components/pipeline/job-pipeline";
import { requireActor } from "@/lib/auth/session";
import { loadForPage } from "@/lib/page-load";
import { getJobPipeline } from "@/lib/pipeline/view";

export const metadata: Metadata = { title: "Job" };
export const dynamic = "force-dynamic";

export default async function JobPage(props: { params: Promise<{ jobId: string }> }) {
  const params = await props.params;
  const actor = await requireActor();
  const view = await loadForPage(params.jobId, (id) => getJobPipeline(actor, id), { hideForbidden: true });
  const { job } = view;
  return (
    <div className="space-y-6">
      <div>
        <Link href="/" className="text-sm text-accent hover:underline">
          ← Jobs
        </Link>
        <h1 className="mt-2 text-2xl font-semibold tracking-tight">
          <span className="font-mono text-lg text-ink-muted">{job.jobNumber}</span> {job.title}
        </h1>
        <p className="mt-1 text-sm text-ink-muted">
          {job.customerName} · compared at {job.artworkDpi} dpi ·{" "}
          <Link href={`/jobs/${job.id}/run`} className="text-accent underline">
            Press run: traceability, chart and reports
          </Link>
        </p>
      </div>
      <JobDetails jobId={job.id} />
      <JobPipeline initial={view} />
    </div>
  );
}
