// Inspections as users act on them: retry a failed one (QA, admin), read a finding's crop image.
import { eq, sql } from "drizzle-orm";
import { db, prepared } from "@/db/client";
import { findings, inspections, jobs, scans } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { authorize, can, type Action, type Actor } from "@/lib/auth/policy";
import { notFound } from "@/lib/errors";
import { enqueueInspection } from "@/lib/queue/queues";
import type { CropKind } from "@/storage/keys";
import type { FindingKind } from "@/lib/imaging/types";
import { conflict, loadJobFor } from "./access";

/**
 * The inspection with its job's id, after the policy check, in one query (the hot path of findings and crops):
 * an inspection the actor may not read is "not found", like one that does not exist.
 */
async function inspectionFor(actor: Actor, id: number, action: Action) {
  const [row] = await db
    .select({ inspection: inspections, jobId: scans.jobId, customerId: jobs.customerId })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .innerJoin(jobs, eq(jobs.id, scans.jobId))
    .where(eq(inspections.id, id))
    .limit(1);
  allowOn(actor, row, action);
  return row;
}

/** An inspection the actor may not read is "not found", like one that does not exist. */
function allowOn(actor: Actor, row: { customerId: number } | undefined, action: Action): asserts row {
  if (!row || !can(actor, "job.read", { customerId: row.customerId })) throw notFound("The inspection");
  authorize(actor, action, { customerId: row.customerId });
}

async function loadInspection(id: number) {
  const [row] = await db
    .select({ inspection: inspections, jobId: scans.jobId })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .where(eq(inspections.id, id))
    .limit(1);
  if (!row) throw notFound("The inspection");
  return row;
}

/** Puts a failed inspection back in the queue with a fresh set of attempts. */
export async function retryInspection(actor: Actor, inspectionId: number): Promise<{ inspectionId: number }> {
  const { inspection, jobId } = await loadInspection(inspectionId);
  const job = await loadJobFor(actor, jobId, "inspection.read");
  authorize(actor, "inspection.retry", { customerId: job.customerId });
  if (inspection.status !== "failed") {
    throw conflict("not_failed", "Only a failed inspection can be retried; this one is " + inspection.status + ".");
  }
  await db.transaction(async (tx) => {
    await tx
      .update(inspections)
      .set({ status: "queued", stage: "queued", progressPercent: 0, errorCode: null, errorMessage: null, version: inspection.version + 1 })
      .where(eq(inspections.id, inspection.id));
    await recordAudit(tx, { actorId: actor.id, action: "inspection.retry", subjectType: "inspection", subjectId: inspection.id });
  });
  await enqueueInspection(inspection.id);
  return { inspectionId: inspection.id };
}

/** The storage key of one crop of one finding, after checking the actor may read the inspection. */
export async function cropKeyFor(actor: Actor, inspectionId: number, findingId: number, kind: CropKind): Promise<string> {
  await inspectionFor(actor, inspectionId, "inspection.read");
  const [finding] = await db.select().from(findings).where(eq(findings.id, findingId)).limit(1);
  if (!finding || finding.inspectionId !== inspectionId) throw notFound("The finding");
  const key = { artwork: finding.cropArtworkKey, scan: finding.cropScanKey, difference: finding.cropDifferenceKey }[kind];
  if (!key) throw notFound("The crop image");
  return key;
}

export interface FindingView {
  id: number;
  kind: FindingKind;
  xMm: number;
  yMm: number;
  wMm: number;
  hMm: number;
  areaMm2: number;
  deltaE00Mean: number;
  deltaE00Max: number;
  up: number | null;
  decision: "pending" | "accepted" | "rejected";
  crops: { artwork: string; scan: string; difference: string } | null;
}

/** One stored finding as the API and the pages show it: mm, ΔE00, up, decision and links to its crop images. */
export function findingView(f: typeof findings.$inferSelect): FindingView {
  const crops = `/api/inspections/${f.inspectionId}/findings/${f.id}/crops`;
  return {
    id: f.id,
    kind: f.kind,
    xMm: f.xUm / 1000,
    yMm: f.yUm / 1000,
    wMm: f.wUm / 1000,
    hMm: f.hUm / 1000,
    areaMm2: f.areaUm2 / 1e6,
    deltaE00Mean: f.deltaE00Mean,
    deltaE00Max: f.deltaE00Max,
    up: f.upIndex,
    decision: f.decision,
    crops: f.cropScanKey ? { artwork: `${crops}/artwork`, scan: `${crops}/scan`, difference: `${crops}/difference` } : null,
  };
}

const findingsWithPolicyFacts = prepared((database) =>
  database
    .select({ customerId: jobs.customerId, finding: findings })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .innerJoin(jobs, eq(jobs.id, scans.jobId))
    .leftJoin(findings, eq(findings.inspectionId, inspections.id))
    .where(eq(inspections.id, sql.placeholder("inspectionId")))
    .prepare(),
);

/** Findings of one inspection with links to their crop images, largest first. */
export async function listFindings(actor: Actor, inspectionId: number): Promise<FindingView[]> {
  // The policy's facts and the findings in one query: a row per finding, or one without a finding when there is none.
  const rows = await findingsWithPolicyFacts().execute({ inspectionId });
  allowOn(actor, rows[0], "inspection.read");
  return rows
    .flatMap((r) => (r.finding ? [r.finding] : []))
    .sort((a, b) => b.areaUm2 - a.areaUm2)
    .map(findingView);
}

export interface InspectionView {
  id: number;
  jobId: number;
  scanId: number;
  sheetNumber: number | null;
  status: "queued" | "running" | "done" | "failed";
  stage: string | null;
  percent: number;
  attempts: number;
  errorCode: string | null;
  errorMessage: string | null;
  /** Scan to artwork: rotation in degrees, scale, shift and residual in mm. Null until aligned. */
  alignment: { rotationDeg: number; scale: number; txMm: number; tyMm: number; residualMm: number | null; correlation: number | null } | null;
  /** The part of the artwork page the scan covered, in mm from the trim box's top-left. */
  coveredArea: { xMm: number; yMm: number; wMm: number; hMm: number } | null;
  /** Overall colour drift of the sheet against the artwork (ΔE00; indicative, a flatbed is not a spectrophotometer). */
  driftDeltaE00: number | null;
  findingsCount: number;
  verdict: "pending" | "passed" | "failed";
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

const mm = (um: number | null) => (um === null ? null : um / 1000);
const isoOrNull = (d: Date | null) => (d ? d.toISOString() : null);

/** One inspection as the API shows it, after the policy check on its job. */
export async function getInspection(actor: Actor, inspectionId: number): Promise<InspectionView> {
  const [row] = await db
    .select({ inspection: inspections, scan: scans })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .where(eq(inspections.id, inspectionId))
    .limit(1);
  if (!row) throw notFound("The inspection");
  await loadJobFor(actor, row.scan.jobId, "inspection.read");
  const i = row.inspection;
  const [{ count }] = await db.select({ count: sql<number>`count(*)`.mapWith(Number) }).from(findings).where(eq(findings.inspectionId, i.id));
  const aligned = i.rotationDeg !== null && i.scale !== null && i.txUm !== null && i.tyUm !== null;
  const covered = i.coveredXUm !== null && i.coveredYUm !== null && i.coveredWUm !== null && i.coveredHUm !== null;
  return {
    id: i.id,
    jobId: row.scan.jobId,
    scanId: row.scan.id,
    sheetNumber: row.scan.sheetNumber,
    status: i.status,
    stage: i.stage,
    percent: i.progressPercent,
    attempts: i.attempts,
    errorCode: i.errorCode,
    errorMessage: i.errorMessage,
    alignment: aligned
      ? { rotationDeg: i.rotationDeg!, scale: i.scale!, txMm: i.txUm! / 1000, tyMm: i.tyUm! / 1000, residualMm: mm(i.residualUm), correlation: i.correlation }
      : null,
    coveredArea: covered ? { xMm: i.coveredXUm! / 1000, yMm: i.coveredYUm! / 1000, wMm: i.coveredWUm! / 1000, hMm: i.coveredHUm! / 1000 } : null,
    driftDeltaE00: i.driftDeltaE00,
    findingsCount: count,
    verdict: i.verdict,
    createdAt: i.createdAt.toISOString(),
    startedAt: isoOrNull(i.startedAt),
    finishedAt: isoOrNull(i.finishedAt),
  };
}
