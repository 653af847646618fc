// GET /api/v1/jobs/{jobId}/run/report.pdf[?revision=N]: the press run report (another customer's job is a 404).
import { readQuery, route } from "@/lib/api/http";
import { RunQuery } from "@/lib/api/run-schemas";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { pdfResponse } from "@/lib/reports/response";
import { runReport } from "@/lib/reports/run-report";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = route<{ jobId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const jobId = parseId(params.jobId, "The job");
  return pdfResponse(await runReport(actor, jobId, readQuery(request, RunQuery).revision));
});
