// GET /api/v1/jobs/{jobId}/run[?revision=N]: the press run's traceability (another customer's job is a 404).
import { json, readQuery, route } from "@/lib/api/http";
import { RunQuery } from "@/lib/api/run-schemas";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { getRunView } from "@/lib/run/traceability";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = route<{ jobId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const jobId = parseId(params.jobId, "The job");
  const { revision } = readQuery(request, RunQuery);
  return json(await getRunView(actor, jobId, revision));
});
