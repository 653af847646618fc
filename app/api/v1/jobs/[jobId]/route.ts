// GET /api/v1/jobs/{jobId}: one job with its artwork revisions and sheets (another customer's job is a 404).
// PATCH: change the job's particulars (admin, prepress), through lib/jobs.
import { json, route } from "@/lib/api/http";
import { jobDetail } from "@/lib/api/views";
import { requestActor } from "@/lib/auth/request-actor";
import { readObject } from "@/lib/api/json-routes";
import { updateJob } from "@/lib/jobs/jobs";
import { parseId } from "@/lib/pipeline/access";
import { getJobPipeline } from "@/lib/pipeline/view";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = route<{ jobId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  return json(jobDetail(await getJobPipeline(actor, parseId(params.jobId, "The job"))));
});

export const PATCH = route<{ jobId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const jobId = parseId(params.jobId, "The job");
  return json(await updateJob(actor, jobId, await readObject(request)));
});
