// POST /api/v1/artwork-revisions/{revisionId}/approve: the draft becomes the artwork scans are compared with.
import { json, route } from "@/lib/api/http";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { approveArtwork } from "@/lib/pipeline/artworks";

export const runtime = "nodejs";

export const POST = route<{ revisionId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  return json(await approveArtwork(actor, parseId(params.revisionId, "The artwork revision")));
});
