import type { Metadata } from "next";
import { forbidden } from "next/navigation";
import { JobForm } from "@/components/jobs/job-form";
import { FormPage } from "@/components/ui/form-page";
import { requireActor } from "@/lib/auth/session";
import { getJob, jobFormOptions } from "@/lib/jobs/jobs";
import { loadForPage } from "@/lib/page-load";

export const metadata: Metadata = { title: "Edit job" };

export default async function EditJobPage(props: { params: Promise<{ jobId: string }> }) {
  const actor = await requireActor();
  const job = await loadForPage((await props.params).jobId, (id) => getJob(actor, id));
  if (!job.may.update) forbidden();
  const options = await jobFormOptions(actor);
  return (
    <FormPage backHref={`/jobs/${job.id}`} backLabel={job.jobNumber} title={`Edit job ${job.jobNumber}`} wide>
      {job.status === "completed" || job.status === "cancelled" ? (
        <p className="text-sm text-ink-muted">This job is closed and is no longer edited.</p>
      ) : (
        <JobForm job={job} options={options} />
      )}
    </FormPage>
  );
}
