// What the job page shows of the pipeline, cut to the fields the page needs. Polled while work is running.
import { asc, desc, eq, inArray, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { artworkRevisions, findings, inspections, scans, toleranceProfiles, users, type ArtworkPreflight, type ExcludedArea, type RectMm } from "@/db/schema";
import { can, type Actor } from "@/lib/auth/policy";
import { loadJobFor } from "./access";
import { upsAreaOf } from "./excluded-areas";

export interface RevisionView {
  id: number;
  revision: number;
  fileName: string;
  bytes: number;
  sha256: string;
  status: "draft" | "approved" | "superseded";
  rasterStatus: "none" | "pending" | "ready" | "failed";
  rasterError: string | null;
  pageWidthMm: number | null;
  pageHeightMm: number | null;
  uploadedAt: string;
  uploadedByName: string | null;
  approvedAt: string | null;
  approvedByName: string | null;
  supersededAt: string | null;
  upsRows: number;
  upsColumns: number;
  /** Where the ups sit on the page, mm; null means the whole page. */
  upsAreaMm: RectMm | null;
  excludedAreas: ExcludedArea[];
  /** The worker's preflight of the PDF (fonts not embedded); null until it has run or when the PDF was unreadable. */
  preflight: ArtworkPreflight | null;
}

export interface SheetView {
  scanId: number;
  sheetNumber: number | null;
  fileName: string;
  bytes: number;
  uploadedAt: string;
  artworkRevision: number;
  inspection: {
    id: number;
    status: "queued" | "running" | "done" | "failed";
    stage: string | null;
    percent: number;
    findingsCount: number;
    errorCode: string | null;
    errorMessage: string | null;
    verdict: "pending" | "passed" | "failed";
    attempts: number;
    profileLabel: string;
    finishedAt: string | null;
  } | null;
}

export interface JobPipelineView {
  job: {
    id: number;
    jobNumber: string;
    title: string;
    customerName: string;
    artworkDpi: number;
    upsRows: number;
    upsColumns: number;
    /** The job's tolerance profile (by name), the upload's default; null means the plant's default. */
    toleranceProfileName: string | null;
  };
  may: { uploadArtwork: boolean; approveArtwork: boolean; uploadScans: boolean; retryInspection: boolean };
  revisions: RevisionView[];
  profiles: { name: string; label: string }[];
  sheets: SheetView[];
  /** True while anything is queued or running: the page keeps polling. */
  busy: boolean;
}

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export async function getJobPipeline(actor: Actor, jobId: number): Promise<JobPipelineView> {
  const job = await loadJobFor(actor, jobId, "job.read");
  const resource = { customerId: job.customerId };
  const revisionRows = await db
    .select()
    .from(artworkRevisions)
    .where(eq(artworkRevisions.jobId, job.id))
    .orderBy(desc(artworkRevisions.revision));
  const personIds = [...new Set(revisionRows.flatMap((r) => [r.uploadedBy, r.approvedBy]).filter((v): v is number => v !== null))];
  const people = personIds.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, personIds)) : [];
  const nameOf = (id: number | null) => people.find((p) => p.id === id)?.name ?? null;
  const scanRows = await db
    .select()
    .from(scans)
    .where(eq(scans.jobId, job.id))
    .orderBy(asc(scans.sheetNumber), asc(scans.id));
  const mayReadInspections = can(actor, "inspection.read", resource);
  const inspectionRows =
    mayReadInspections && scanRows.length > 0
      ? await db
          .select({
            inspection: inspections,
            profileLabel: toleranceProfiles.label,
            findingsCount: sql<number>`(select count(*) from ${findings} where ${findings.inspectionId} = ${inspections.id})`.mapWith(Number),
          })
          .from(inspections)
          .innerJoin(toleranceProfiles, eq(toleranceProfiles.id, inspections.toleranceProfileId))
          .where(inArray(inspections.scanId, scanRows.map((s) => s.id)))
          .orderBy(desc(inspections.id))
      : [];
  const revisionNumber = new Map(revisionRows.map((r) => [r.id, r.revision]));
  const sheets: SheetView[] = scanRows.map((s) => {
    // The newest inspection of a scan is the one shown.
    const row = inspectionRows.find((r) => r.inspection.scanId === s.id);
    const i = row?.inspection;
    return {
      scanId: s.id,
      sheetNumber: s.sheetNumber,
      fileName: s.originalFilename,
      bytes: s.byteSize,
      uploadedAt: s.createdAt.toISOString(),
      artworkRevision: revisionNumber.get(s.artworkRevisionId) ?? 0,
      inspection: i
        ? {
            id: i.id,
            status: i.status,
            stage: i.stage,
            percent: i.progressPercent,
            findingsCount: row.findingsCount,
            errorCode: i.errorCode,
            errorMessage: i.errorMessage,
            verdict: i.verdict,
            attempts: i.attempts,
            profileLabel: row.profileLabel,
            finishedAt: iso(i.finishedAt),
          }
        : null,
    };
  });
  const profileRows = await db.select({ id: toleranceProfiles.id, name: toleranceProfiles.name, label: toleranceProfiles.label }).from(toleranceProfiles).orderBy(asc(toleranceProfiles.id));
  const profiles = profileRows.map(({ name, label }) => ({ name, label }));
  return {
    job: {
      id: job.id,
      jobNumber: job.jobNumber,
      title: job.title,
      customerName: job.customerName,
      artworkDpi: job.artworkDpi,
      upsRows: job.upsRows,
      upsColumns: job.upsColumns,
      toleranceProfileName: profileRows.find((p) => p.id === job.toleranceProfileId)?.name ?? null,
    },
    may: {
      uploadArtwork: can(actor, "artwork.upload", resource),
      approveArtwork: can(actor, "artwork.approve", resource),
      uploadScans: can(actor, "scan.upload", resource),
      retryInspection: can(actor, "inspection.retry", resource),
    },
    revisions: revisionRows.map((r) => ({
      id: r.id,
      revision: r.revision,
      fileName: r.originalFilename,
      bytes: r.byteSize,
      sha256: r.sourceSha256,
      status: r.status,
      rasterStatus: r.rasterStatus,
      rasterError: r.rasterError,
      pageWidthMm: r.pageWidthUm ? r.pageWidthUm / 1000 : null,
      pageHeightMm: r.pageHeightUm ? r.pageHeightUm / 1000 : null,
      uploadedAt: r.createdAt.toISOString(),
      uploadedByName: nameOf(r.uploadedBy),
      approvedAt: iso(r.approvedAt),
      approvedByName: nameOf(r.approvedBy),
      supersededAt: iso(r.supersededAt),
      upsRows: r.upsRows,
      upsColumns: r.upsColumns,
      upsAreaMm: upsAreaOf(r),
      excludedAreas: r.excludedAreas,
      preflight: r.preflight,
    })),
    profiles,
    sheets,
    busy:
      revisionRows.some((r) => r.rasterStatus === "pending") ||
      // A draft's page picture and size are being made by the worker.
      revisionRows.some((r) => r.status === "draft" && r.pageWidthUm === 0) ||
      sheets.some((s) => s.inspection?.status === "queued" || s.inspection?.status === "running"),
  };
}
