// What the job page shows of the pipeline, cut to the fields the page needs. Polled while work is running.
import { asc, desc, eq, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/mysql-core";
import { prepared } from "@/db/client";
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

const uploader = alias(users, "uploader");
const approver = alias(users, "approver");

/** The job's revisions, newest first, with the names of who uploaded and approved each (one query). */
const revisionsOf = prepared((database) => {
  const r = artworkRevisions;
  return database
    .select({
      id: r.id, revision: r.revision, originalFilename: r.originalFilename, byteSize: r.byteSize, sourceSha256: r.sourceSha256, status: r.status,
      rasterStatus: r.rasterStatus, rasterError: r.rasterError, pageWidthUm: r.pageWidthUm, pageHeightUm: r.pageHeightUm, createdAt: r.createdAt,
      approvedAt: r.approvedAt, supersededAt: r.supersededAt, upsRows: r.upsRows, upsColumns: r.upsColumns, excludedAreas: r.excludedAreas, preflight: r.preflight,
      upsAreaXUm: r.upsAreaXUm, upsAreaYUm: r.upsAreaYUm, upsAreaWUm: r.upsAreaWUm, upsAreaHUm: r.upsAreaHUm,
      uploadedByName: uploader.name,
      approvedByName: approver.name,
    })
    .from(artworkRevisions)
    .leftJoin(uploader, eq(uploader.id, artworkRevisions.uploadedBy))
    .leftJoin(approver, eq(approver.id, artworkRevisions.approvedBy))
    .where(eq(artworkRevisions.jobId, sql.placeholder("jobId")))
    .orderBy(desc(artworkRevisions.revision))
    .prepare();
});

/** The job's scans in sheet order, each with every inspection of it, newest first (one query). */
const sheetsOf = prepared((database) =>
  database
    .select({
      scan: { id: scans.id, sheetNumber: scans.sheetNumber, originalFilename: scans.originalFilename, byteSize: scans.byteSize, createdAt: scans.createdAt, artworkRevisionId: scans.artworkRevisionId },
      inspection: {
        id: inspections.id,
        status: inspections.status,
        stage: inspections.stage,
        progressPercent: inspections.progressPercent,
        errorCode: inspections.errorCode,
        errorMessage: inspections.errorMessage,
        verdict: inspections.verdict,
        attempts: inspections.attempts,
        finishedAt: inspections.finishedAt,
      },
      profileLabel: toleranceProfiles.label,
      findingsCount: sql<number>`(select count(*) from ${findings} where ${findings.inspectionId} = ${inspections.id})`.mapWith(Number),
    })
    .from(scans)
    .leftJoin(inspections, eq(inspections.scanId, scans.id))
    .leftJoin(toleranceProfiles, eq(toleranceProfiles.id, inspections.toleranceProfileId))
    .where(eq(scans.jobId, sql.placeholder("jobId")))
    .orderBy(asc(scans.sheetNumber), asc(scans.id), desc(inspections.id))
    .prepare(),
);

const profilesInOrder = prepared((database) =>
  database.select({ id: toleranceProfiles.id, name: toleranceProfiles.name, label: toleranceProfiles.label }).from(toleranceProfiles).orderBy(asc(toleranceProfiles.id)).prepare(),
);

export async function getJobPipeline(actor: Actor, jobId: number): Promise<JobPipelineView> {
  // Independent reads, sent together; nothing of them leaves this function unless the actor may read the job.
  const [job, revisionRows, sheetRows, profileRows] = await Promise.all([
    loadJobFor(actor, jobId, "job.read"),
    revisionsOf().execute({ jobId }),
    sheetsOf().execute({ jobId }),
    profilesInOrder().execute(),
  ]);
  const resource = { customerId: job.customerId };
  const mayReadInspections = can(actor, "inspection.read", resource);
  // One row per inspection (or one for a scan without any); the first of a scan is its newest inspection.
  const scanRows = sheetRows.filter((r, k) => k === 0 || sheetRows[k - 1].scan.id !== r.scan.id);
  const revisionNumber = new Map(revisionRows.map((r) => [r.id, r.revision]));
  const sheets: SheetView[] = scanRows.map(({ scan: s, inspection, profileLabel, findingsCount }) => {
    const i = mayReadInspections ? inspection : null;
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
            findingsCount,
            errorCode: i.errorCode,
            errorMessage: i.errorMessage,
            verdict: i.verdict,
            attempts: i.attempts,
            profileLabel: profileLabel ?? "",
            finishedAt: iso(i.finishedAt),
          }
        : null,
    };
  });
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
      uploadedByName: r.uploadedByName,
      approvedAt: iso(r.approvedAt),
      approvedByName: r.approvedByName,
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
