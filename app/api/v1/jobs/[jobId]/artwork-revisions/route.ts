// POST /api/v1/jobs/{jobId}/artwork-revisions (multipart, field "file"): the job's next draft artwork revision.
import { json, route } from "@/lib/api/http";
import { requireMultipart } from "@/lib/api/views";
import { requestActor } from "@/lib/auth/request-actor";
import { loadJobFor, parseId } from "@/lib/pipeline/access";
import { uploadArtwork } from "@/lib/pipeline/artworks";

export const runtime = "nodejs";

export const POST = route<{ jobId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const jobId = parseId(params.jobId, "The job");
  // The policy answers before the body is looked at: a role that may not upload learns nothing more.
  await loadJobFor(actor, jobId, "artwork.upload");
  requireMultipart(request);
  const result = await uploadArtwork(actor, jobId, request);
  return json(result, result.duplicate ? 200 : 201);
});
