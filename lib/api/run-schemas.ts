// The zod schemas of the press-run routes of /api/v1 (traceability, CSV, reports); lib/api/openapi.ts adds them
// to the OpenAPI document from lib/api/openapi-run.ts.
import "zod-openapi";
import { z } from "zod";

const isoTime = z.iso.datetime().meta({ description: "ISO 8601 time in UTC" });

export const RunQuery = z
  .object({ revision: z.coerce.number().int().min(1).max(65535).optional().meta({ description: "Artwork revision number of the run; default: the approved one" }) })
  .strict();

const openEnd = (what: string) => z.number().int().nullable().meta({ description: `${what}; null when open-ended` });

export const RunSheet = z
  .object({
    scanId: z.number().int(),
    inspectionId: z.number().int().nullable(),
    sheetNumber: z.number().int().nullable(),
    scanFileName: z.string(),
    scanSha256: z.string(),
    uploadedAt: isoTime,
    status: z.enum(["queued", "running", "done", "failed"]).nullable(),
    verdict: z.enum(["pending", "passed", "failed"]),
    inspectedAt: isoTime.nullable(),
    driftDeltaE00: z.number().nullable().meta({ description: "Overall colour drift ΔE00 (indicative: a flatbed scan is not a calibrated measurement)" }),
    findings: z.number().int(),
    rejectedFindings: z.number().int(),
    repeatingFindings: z.number().int(),
    everyUpFindings: z.number().int(),
    signedBy: z.string().nullable(),
    signedAt: isoTime.nullable(),
    signatureMeaning: z.string().nullable(),
    recordSha256: z.string().nullable(),
    spanToPull: z.string().nullable().meta({ description: "For a failed sheet: the sheets to pull, in words" }),
  })
  .meta({ id: "RunSheet" });

export const Run = z
  .object({
    job: z.object({
      id: z.number().int(),
      jobNumber: z.string(),
      title: z.string(),
      customerName: z.string(),
      customerId: z.number().int(),
      runLengthSheets: z.number().int().nullable(),
    }),
    revision: z.object({ id: z.number().int(), revision: z.number().int(), fileName: z.string(), sha256: z.string(), status: z.enum(["draft", "approved", "superseded"]) }),
    runs: z.array(z.object({ revisionId: z.number().int(), revision: z.number().int(), sheets: z.number().int() })),
    profile: z.object({ name: z.string(), label: z.string(), deltaE00Threshold: z.number() }).nullable(),
    sheets: z.array(RunSheet).meta({ description: "Sheets in sheet-number order; sheets without a number last" }),
    inspected: z.number().int(),
    sampling: z.string().meta({ example: "23 of 400 sheets, about one in 17" }),
    spans: z.array(
      z.object({
        from: openEnd("First sheet to pull"),
        to: openEnd("Last sheet to pull"),
        failedSheets: z.array(z.number().int()),
        text: z.string(),
        sheets: z.number().int().nullable(),
      }),
    ),
  })
  .meta({ id: "Run", description: "A press run: one artwork revision of a job and the sheets pulled from it" });
