// What the worker reads and writes about rasters and inspections. Results replace earlier ones in one
// transaction, so re-running an inspection (retry, a worker killed half-way) never duplicates findings.
import { and, eq, inArray, ne, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { artworkRevisions, customers, findings, inspections, jobs, scans, toleranceProfiles, users, type ArtworkPreflight } from "@/db/schema";
import type { Finding, InspectionResult, ToleranceProfile } from "@/lib/imaging/types";
import { refreshRunMemory, revisionOfInspection } from "@/lib/run/memory-store";

const um = (mm: number) => Math.round(mm * 1000);

export async function loadRevisionWork(revisionId: number) {
  const [row] = await db
    .select({ revision: artworkRevisions, job: jobs })
    .from(artworkRevisions)
    .innerJoin(jobs, eq(jobs.id, artworkRevisions.jobId))
    .where(eq(artworkRevisions.id, revisionId))
    .limit(1);
  return row ?? null;
}

export async function saveRaster(
  revisionId: number,
  raster: { key: string; dpi: number; widthMm: number; heightMm: number; box: string; pageCount: number },
) {
  await db
    .update(artworkRevisions)
    .set({
      rasterStatus: "ready",
      rasterDpi: raster.dpi,
      rasterKeys: [raster.key],
      rasterError: null,
      pageWidthUm: um(raster.widthMm),
      pageHeightUm: um(raster.heightMm),
      pageBox: raster.box,
      pageCount: raster.pageCount,
    })
    .where(eq(artworkRevisions.id, revisionId));
}

/** The page size measured for a draft's preview; the comparison raster, when made, writes its own. */
export async function savePageSize(revisionId: number, page: { widthMm: number; heightMm: number; box: string; pageCount: number }) {
  await db
    .update(artworkRevisions)
    .set({ pageWidthUm: um(page.widthMm), pageHeightUm: um(page.heightMm), pageBox: page.box, pageCount: page.pageCount })
    .where(and(eq(artworkRevisions.id, revisionId), ne(artworkRevisions.rasterStatus, "ready")));
}

/** The preflight of the revision's PDF (lib/pipeline/preflight.ts); null means it could not be read. */
export async function savePreflight(revisionId: number, preflight: ArtworkPreflight | null) {
  await db.update(artworkRevisions).set({ preflight }).where(eq(artworkRevisions.id, revisionId));
}

export async function savePrepared(revisionId: number, key: string) {
  await db.update(artworkRevisions).set({ preparedKey: key }).where(eq(artworkRevisions.id, revisionId));
}

/**
 * The registration tolerance the job's sheets will most likely be inspected with: the job's profile, else the
 * one an upload gets when it names none (the first).
 */
export async function likelyRegistrationToleranceMm(job: { toleranceProfileId: number | null }): Promise<number | null> {
  const rows = await db
    .select({ um: toleranceProfiles.registrationToleranceUm })
    .from(toleranceProfiles)
    .where(job.toleranceProfileId ? eq(toleranceProfiles.id, job.toleranceProfileId) : sql`1 = 1`)
    .orderBy(toleranceProfiles.id)
    .limit(1);
  return rows[0] ? rows[0].um / 1000 : null;
}

export async function failRaster(revisionId: number, message: string) {
  await db.update(artworkRevisions).set({ rasterStatus: "failed", rasterError: message }).where(eq(artworkRevisions.id, revisionId));
}

export async function loadInspectionWork(inspectionId: number) {
  const [row] = await db
    .select({ inspection: inspections, scan: scans, revision: artworkRevisions, job: jobs, profile: toleranceProfiles, customerName: customers.name })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .innerJoin(artworkRevisions, eq(artworkRevisions.id, inspections.artworkRevisionId))
    .innerJoin(jobs, eq(jobs.id, scans.jobId))
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .innerJoin(toleranceProfiles, eq(toleranceProfiles.id, inspections.toleranceProfileId))
    .where(eq(inspections.id, inspectionId))
    .limit(1);
  return row ?? null;
}
export type InspectionWork = NonNullable<Awaited<ReturnType<typeof loadInspectionWork>>>;

export function profileOf(row: InspectionWork["profile"]): ToleranceProfile {
  return {
    name: row.name,
    label: row.label,
    minDefectMm: row.minDefectUm / 1000,
    deltaE00Threshold: row.deltaE00Threshold,
    registrationToleranceMm: row.registrationToleranceUm / 1000,
    excludedAreasMm: [...(row.excludedAreasMm ?? [])],
  };
}

export async function markRunning(inspectionId: number) {
  await db
    .update(inspections)
    .set({ status: "running", stage: "load", progressPercent: 0, errorCode: null, errorMessage: null, startedAt: new Date(), attempts: sql`${inspections.attempts} + 1` })
    .where(eq(inspections.id, inspectionId));
}

export async function setProgress(inspectionId: number, stage: string, percent: number) {
  // Never overwrite a finished inspection with a late progress write.
  await db
    .update(inspections)
    .set({ stage, progressPercent: Math.max(0, Math.min(100, Math.round(percent))) })
    .where(and(eq(inspections.id, inspectionId), ne(inspections.status, "done")));
}

export async function setScanDpi(scanId: number, dpi: number) {
  await db.update(scans).set({ dpi: Math.round(dpi) }).where(eq(scans.id, scanId));
}

export interface StoredCrops {
  artwork: string;
  scan: string;
  difference: string;
}

/** Replace the inspection's findings and record the result, all in one transaction. */
export async function saveInspectionResult(inspectionId: number, result: InspectionResult, crops: (StoredCrops | null)[]) {
  const a = result.alignment;
  await db.transaction(async (tx) => {
    await tx.delete(findings).where(eq(findings.inspectionId, inspectionId));
    const rows = result.findings.map((f: Finding, i) => ({
      inspectionId,
      xUm: um(f.xMm),
      yUm: um(f.yMm),
      wUm: um(f.wMm),
      hUm: um(f.hMm),
      areaUm2: Math.round(f.areaMm2 * 1e6),
      deltaE00Mean: f.deltaE00Mean,
      deltaE00Max: f.deltaE00Max,
      kind: f.kind,
      upIndex: f.up,
      cropArtworkKey: crops[i]?.artwork ?? null,
      cropScanKey: crops[i]?.scan ?? null,
      cropDifferenceKey: crops[i]?.difference ?? null,
    }));
    for (let i = 0; i < rows.length; i += 500) await tx.insert(findings).values(rows.slice(i, i + 500));
    await tx
      .update(inspections)
      .set({
        status: "done",
        stage: "done",
        progressPercent: 100,
        errorCode: null,
        errorMessage: null,
        rotationDeg: a.rotationDeg,
        scale: a.scale,
        txUm: um(a.txMm),
        tyUm: um(a.tyMm),
        residualUm: um(a.residualMm),
        correlation: a.correlation,
        coveredXUm: um(result.coveredMm.x),
        coveredYUm: um(result.coveredMm.y),
        coveredWUm: um(result.coveredMm.w),
        coveredHUm: um(result.coveredMm.h),
        driftDeltaE00: result.drift.deltaE00,
        timingsMs: result.timingsMs,
        finishedAt: new Date(),
        version: sql`${inspections.version} + 1`,
      })
      .where(eq(inspections.id, inspectionId));
    const revisionId = await revisionOfInspection(tx, inspectionId);
    if (revisionId) await refreshRunMemory(tx, revisionId);
  });
}

export async function failInspection(inspectionId: number, code: string, message: string) {
  await db
    .update(inspections)
    .set({ status: "failed", stage: "failed", errorCode: code.slice(0, 64), errorMessage: message, finishedAt: new Date(), version: sql`${inspections.version} + 1` })
    .where(and(eq(inspections.id, inspectionId), ne(inspections.status, "done")));
}

/** Work that should be in the queue: approved revisions waiting for a raster, inspections not finished. */
export async function unfinishedWork() {
  const rasters = await db
    .select({ id: artworkRevisions.id, dpi: artworkRevisions.rasterDpi })
    .from(artworkRevisions)
    .where(and(eq(artworkRevisions.status, "approved"), eq(artworkRevisions.rasterStatus, "pending")));
  const open = await db
    .select({ id: inspections.id })
    .from(inspections)
    .where(inArray(inspections.status, ["queued", "running"]));
  return { rasters, inspections: open.map((o) => o.id) };
}

/** Active users with one of these roles (mail recipients). */
export async function usersWithRoles(roles: ("reviewer" | "qa" | "prepress" | "admin")[]) {
  return db
    .select({ email: users.email, name: users.name })
    .from(users)
    .where(and(inArray(users.role, roles), eq(users.disabled, false)));
}

export async function countFindings(inspectionId: number): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(*)`.mapWith(Number) })
    .from(findings)
    .where(eq(findings.inspectionId, inspectionId));
  return row?.n ?? 0;
}
