// The canonical record of one inspection that a signature covers: the artwork and scan files (sha256), the
// alignment, and every finding with its decision. Serialised with sorted keys and fixed units (µm, ΔE00 as
// stored) so the same record always gives the same sha256, and any later change to it gives another.
import { createHash } from "node:crypto";
import { asc, eq } from "drizzle-orm";
import { db, type Db, type Tx } from "@/db/client";
import { artworkRevisions, findings, inspections, scans } from "@/db/schema";
import { notFound } from "@/lib/errors";

/** JSON with object keys sorted at every level: one text for one record. */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== "object") return JSON.stringify(value ?? null);
  if (value instanceof Date) return JSON.stringify(value.toISOString());
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
}

export async function inspectionRecord(inspectionId: number, executor: Db | Tx = db) {
  const [row] = await executor
    .select({ inspection: inspections, scanSha256: scans.sha256, sheetNumber: scans.sheetNumber, artworkSha256: artworkRevisions.sourceSha256, revision: artworkRevisions.revision })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .innerJoin(artworkRevisions, eq(artworkRevisions.id, inspections.artworkRevisionId))
    .where(eq(inspections.id, inspectionId))
    .limit(1);
  if (!row) throw notFound("The sheet");
  const i = row.inspection;
  const rows = await executor.select().from(findings).where(eq(findings.inspectionId, inspectionId)).orderBy(asc(findings.id));
  return {
    inspectionId: i.id,
    artwork: { sha256: row.artworkSha256, revision: row.revision },
    scan: { sha256: row.scanSha256, sheetNumber: row.sheetNumber },
    alignment: {
      rotationDeg: i.rotationDeg,
      scale: i.scale,
      txUm: i.txUm,
      tyUm: i.tyUm,
      residualUm: i.residualUm,
      correlation: i.correlation,
      coveredUm: [i.coveredXUm, i.coveredYUm, i.coveredWUm, i.coveredHUm],
    },
    findings: rows.map((f) => ({
      id: f.id,
      kind: f.kind,
      boxUm: [f.xUm, f.yUm, f.wUm, f.hUm],
      areaUm2: f.areaUm2,
      deltaE00Mean: f.deltaE00Mean,
      deltaE00Max: f.deltaE00Max,
      up: f.upIndex,
      decision: f.decision,
      reason: f.decisionReason,
      comment: f.comment,
      decidedBy: f.decidedBy,
      decidedAt: f.decidedAt,
    })),
  };
}

export async function recordSha256(inspectionId: number, executor: Db | Tx = db): Promise<string> {
  return createHash("sha256").update(canonicalJson(await inspectionRecord(inspectionId, executor))).digest("hex");
}
