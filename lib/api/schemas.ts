// The zod schemas of /api/v1: route handlers validate input with them and lib/api/openapi.ts builds the OpenAPI
// document from the very same objects, so the document cannot drift from what the handlers accept and return.
// Lengths are millimetres, times ISO 8601 in UTC.
import "zod-openapi";
import { z } from "zod";

const isoTime = z.iso.datetime().meta({ description: "ISO 8601 time in UTC", example: "2026-12-02T18:30:00.000Z" });
const mm = (description: string) => z.number().meta({ description: `${description}, millimetres` });

export const ErrorBody = z
  .object({ error: z.object({ code: z.string().meta({ example: "not_found" }), message: z.string() }) })
  .meta({ id: "Error", description: "Every error: a stable code and a message in plain words." });

export const IdParam = z.string().regex(/^\d{1,15}$/).meta({ description: "Numeric id", example: "42" });

export const PageQuery = z
  .object({
    limit: z.coerce.number().int().min(1).max(100).default(25).meta({ description: "Items per page (1–100)" }),
    cursor: z.string().max(200).optional().meta({ description: "nextCursor of the previous page" }),
  })
  .strict();

const nextCursor = z.string().nullable().meta({ description: "Pass as cursor for the next page; null on the last page" });

export const JobSummary = z
  .object({
    id: z.number().int(),
    jobNumber: z.string(),
    title: z.string(),
    customerId: z.number().int(),
    customerName: z.string(),
    status: z.enum(["prepress", "on_press", "completed", "cancelled"]),
    press: z.string(),
    scanCount: z.number().int(),
    openSheetCount: z.number().int().meta({ description: "Inspected sheets not yet signed off" }),
    updatedAt: isoTime,
  })
  .meta({ id: "JobSummary" });

export const JobPage = z.object({ items: z.array(JobSummary), nextCursor }).meta({ id: "JobPage" });

export const ArtworkRevision = z
  .object({
    id: z.number().int(),
    revision: z.number().int(),
    fileName: z.string(),
    bytes: z.number().int(),
    sha256: z.string(),
    status: z.enum(["draft", "approved", "superseded"]),
    rasterStatus: z.enum(["none", "pending", "ready", "failed"]),
    rasterError: z.string().nullable(),
    pageWidthMm: z.number().nullable(),
    pageHeightMm: z.number().nullable(),
    uploadedAt: isoTime,
    approvedAt: isoTime.nullable(),
    preflight: z
      .object({
        nonEmbeddedFonts: z.array(z.string()).meta({
          description:
            "BaseFont names of fonts the PDF uses without embedding them (at most 100); a press's RIP substitutes its own font for each, so type may differ from the comparison raster",
          example: ["Helvetica", "Helvetica-Bold"],
        }),
      })
      .nullable()
      .meta({ description: "Checks of the PDF made when the draft's preview is made; null until then, or when the PDF could not be read" }),
  })
  .meta({ id: "ArtworkRevision" });

export const Sheet = z
  .object({
    scanId: z.number().int(),
    sheetNumber: z.number().int().nullable(),
    fileName: z.string(),
    bytes: z.number().int(),
    uploadedAt: isoTime,
    artworkRevision: z.number().int(),
    inspectionId: z.number().int().nullable(),
    status: z.enum(["queued", "running", "done", "failed"]).nullable(),
    percent: z.number().int().nullable(),
    findingsCount: z.number().int().nullable(),
    verdict: z.enum(["pending", "passed", "failed"]).nullable(),
  })
  .meta({ id: "Sheet" });

export const JobDetail = z
  .object({
    id: z.number().int(),
    jobNumber: z.string(),
    title: z.string(),
    customerName: z.string(),
    artworkDpi: z.number().int(),
    upsRows: z.number().int(),
    upsColumns: z.number().int(),
    revisions: z.array(ArtworkRevision),
    sheets: z.array(Sheet),
    busy: z.boolean().meta({ description: "True while a rasterisation or inspection is queued or running" }),
  })
  .meta({ id: "JobDetail" });

export const ArtworkUploadForm = z
  .object({ file: z.string().meta({ format: "binary", description: "The approved artwork PDF" }) })
  .meta({ id: "ArtworkUploadForm" });

export const ArtworkUploadResult = z
  .object({ revisionId: z.number().int(), revision: z.number().int(), duplicate: z.boolean(), message: z.string() })
  .meta({ id: "ArtworkUploadResult" });

export const ApproveResult = z
  .object({ revisionId: z.number().int(), dpi: z.number().int().meta({ description: "Resolution the artwork is rasterised at" }) })
  .meta({ id: "ApproveResult" });

export const ScanUploadForm = z
  .object({
    file: z.string().meta({ format: "binary", description: "Scan of one pulled press sheet (TIFF, PNG or JPEG); repeat for several" }),
    sheetNumber: z.string().optional().meta({ description: "Inkjet sheet number, a whole number from 1 (one file); else read from the file name" }),
    profile: z.string().optional().meta({ description: "Tolerance profile name, e.g. standard-food" }),
    dpi: z.string().optional().meta({ description: "Scan resolution, 50–4800; else read from the file" }),
  })
  .meta({ id: "ScanUploadForm" });

export const ScanUploadResult = z
  .object({
    items: z.array(
      z.object({
        fileName: z.string(),
        duplicate: z.boolean(),
        scanId: z.number().int(),
        inspectionId: z.number().int().nullable(),
        sheetNumber: z.number().int().nullable(),
        message: z.string(),
      }),
    ),
  })
  .meta({ id: "ScanUploadResult" });

export const Inspection = z
  .object({
    id: z.number().int(),
    jobId: z.number().int(),
    scanId: z.number().int(),
    sheetNumber: z.number().int().nullable(),
    status: z.enum(["queued", "running", "done", "failed"]),
    stage: z.string().nullable(),
    percent: z.number().int().min(0).max(100),
    attempts: z.number().int(),
    errorCode: z.string().nullable(),
    errorMessage: z.string().nullable(),
    alignment: z
      .object({
        rotationDeg: z.number(),
        scale: z.number(),
        txMm: mm("Shift along x"),
        tyMm: mm("Shift along y"),
        residualMm: z.number().nullable().meta({ description: "Residual after alignment, millimetres" }),
        correlation: z.number().nullable(),
      })
      .nullable(),
    coveredArea: z.object({ xMm: mm("Left"), yMm: mm("Top"), wMm: mm("Width"), hMm: mm("Height") }).nullable(),
    driftDeltaE00: z.number().nullable().meta({ description: "Overall ΔE00 drift; indicative only, a spectrophotometer decides" }),
    findingsCount: z.number().int(),
    verdict: z.enum(["pending", "passed", "failed"]),
    createdAt: isoTime,
    startedAt: isoTime.nullable(),
    finishedAt: isoTime.nullable(),
  })
  .meta({ id: "Inspection" });

export const Finding = z
  .object({
    id: z.number().int(),
    kind: z.enum(["extra_ink", "missing_ink", "colour_shift", "changed_text", "streak"]),
    xMm: mm("Left of the box from the trim box's left edge"),
    yMm: mm("Top of the box from the trim box's top edge"),
    wMm: mm("Box width"),
    hMm: mm("Box height"),
    areaMm2: z.number().meta({ description: "Area, square millimetres" }),
    deltaE00Mean: z.number(),
    deltaE00Max: z.number(),
    up: z.number().int().nullable().meta({ description: "1-based up, row by row; null outside every up" }),
    decision: z.enum(["pending", "accepted", "rejected"]),
    crops: z.object({ artwork: z.string(), scan: z.string(), difference: z.string() }).nullable().meta({ description: "Crop image paths (same authentication)" }),
  })
  .meta({ id: "Finding" });

export const FindingPage = z.object({ items: z.array(Finding), nextCursor }).meta({ id: "FindingPage" });

export const RetryResult = z.object({ inspectionId: z.number().int() }).meta({ id: "RetryResult" });
