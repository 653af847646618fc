// GET /api/v1/jobs/{jobId}/run/sheets.csv[?revision=N]: the run's traceability table as CSV (RFC 4180, UTF-8).
import { readQuery, route } from "@/lib/api/http";
import { RunQuery } from "@/lib/api/run-schemas";
import { requestActor } from "@/lib/auth/request-actor";
import { parseId } from "@/lib/pipeline/access";
import { csvFileName, runCsv } from "@/lib/run/csv";
import { getRunView } from "@/lib/run/traceability";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = route<{ jobId: string }>(async (request, params) => {
  const actor = await requestActor(request);
  const jobId = parseId(params.jobId, "The job");
  const run = await getRunView(actor, jobId, readQuery(request, RunQuery).revision);
  return new Response(runCsv(run), {
    headers: {
      // RFC 4180 §3: the header parameter says the first line names the columns.
      "Content-Type": "text/csv; charset=utf-8; header=present",
      "Content-Disposition": `attachment; filename="${csvFileName(run)}"`,
      "Cache-Control": "no-store",
    },
  });
});
