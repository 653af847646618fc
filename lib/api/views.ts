// Shapes of /api/v1 answers built from the data-access layer's views (lib/jobs, lib/pipeline), checked against
// the zod schemas in development and tests so a drift between code and document shows up at once.
import type { z } from "zod";
import { AppError } from "@/lib/errors";
import type { JobListItem } from "@/lib/jobs/queries";
import type { JobPipelineView } from "@/lib/pipeline/view";
import type { JobDetail, JobSummary } from "./schemas";

export function jobSummary(job: JobListItem): z.infer<typeof JobSummary> {
  return { ...job, updatedAt: job.updatedAt.toISOString() };
}

export function jobDetail(view: JobPipelineView): z.infer<typeof JobDetail> {
  return {
    ...view.job,
    revisions: view.revisions,
    sheets: view.sheets.map((s) => ({
      scanId: s.scanId,
      sheetNumber: s.sheetNumber,
      fileName: s.fileName,
      bytes: s.bytes,
      uploadedAt: s.uploadedAt,
      artworkRevision: s.artworkRevision,
      inspectionId: s.inspection?.id ?? null,
      status: s.inspection?.status ?? null,
      percent: s.inspection?.percent ?? null,
      findingsCount: s.inspection?.findingsCount ?? null,
      verdict: s.inspection?.verdict ?? null,
    })),
    busy: view.busy,
  };
}

/** Uploads are multipart; anything else is refused before a byte is stored. */
export function requireMultipart(request: Request): void {
  const type = (request.headers.get("content-type") ?? "").toLowerCase();
  if (!type.startsWith("multipart/form-data")) {
    throw new AppError("unsupported_media_type", "Send files as multipart/form-data (curl -F file=@scan.tif).", 415);
  }
}
