// POST /api/v1/jobs/{jobId}/scans (multipart): scans streamed into storage, each with its sheet number; one
// inspection queued per new scan. A file already uploaded to the job is recognised and not stored twice.
import { json, route } from "@/lib/api/http";
import { requireMultipart } from "@/lib/api/views";
import { requestActor } from "@/lib/auth/request-actor";
import { loadJobFor, parseId } from "@/lib/pipeline/access";
import { uploadScans } from "@/lib/pipeline/scans";

export const runtime = "nodejs";

export const POST = route<{ jobId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const jobId = parseId(params.jobId, "The job");
  // The policy answers before the body is looked at: a role that may not upload learns nothing more.
  await loadJobFor(actor, jobId, "scan.upload");
  requireMultipart(request);
  const result = await uploadScans(actor, jobId, request);
  return json(result, result.items.some((i) => !i.duplicate) ? 201 : 200);
});
