// What the sheet page shows: the sheet's geometry (page, ups, covered area), its tile layers, every finding with
// its decision and the version a decision must name, the signatures, and what the actor may do. Cut to the
// fields the page needs; customer users get the same read-only view of their own sheets.
import { desc, eq, inArray } from "drizzle-orm";
import { db } from "@/db/client";
import { findings, inspections, scans, users } from "@/db/schema";
import { can, type Actor } from "@/lib/auth/policy";
import type { Decision, DecisionReason } from "./decisions";
import { findingView, type FindingView } from "@/lib/pipeline/inspections";
import { loadSheetFor } from "./load";
import { listSignatures, type SignatureView } from "./signoff";

export interface SheetFinding extends FindingView {
  /** 1-based number shown on the box and in the list (largest first). */
  number: number;
  decision: "pending" | Decision;
  reason: DecisionReason | null;
  comment: string | null;
  decidedBy: string | null;
  decidedAt: string | null;
  version: number;
  /** How the finding stands in the press run (null until the run memory has looked at it). */
  recurrence: "isolated" | "repeating" | "every_up" | null;
  /** Run memory: the accepted finding of an earlier sheet at the same place, for the reviewer to confirm. */
  prior: PriorFinding | null;
}

export interface PriorFinding {
  findingId: number;
  inspectionId: number;
  sheetNumber: number | null;
  reason: DecisionReason | null;
  comment: string | null;
  decidedBy: string | null;
}

export interface SheetView {
  inspectionId: number;
  job: { id: number; jobNumber: string; title: string; customerName: string };
  sheetNumber: number | null;
  scanFileName: string;
  artworkRevision: number;
  status: "queued" | "running" | "done" | "failed";
  verdict: "pending" | "passed" | "failed";
  finishedAt: string | null;
  page: { widthMm: number; heightMm: number };
  ups: { rows: number; columns: number; areaMm: { x: number; y: number; w: number; h: number } };
  coveredMm: { x: number; y: number; w: number; h: number } | null;
  alignment: { rotationDeg: number | null; residualMm: number | null; correlation: number | null; driftDeltaE00: number | null };
  tiles: { status: "none" | "pending" | "ready" | "failed"; artwork: string; scan: string; difference: string } | null;
  findings: SheetFinding[];
  signatures: SignatureView[];
  /** Other sheets of the job, for moving between them. */
  siblings: { inspectionId: number; sheetNumber: number | null }[];
  may: { decide: boolean; signoff: boolean; reopen: boolean };
}

/** The earlier accepted findings that findings of this sheet point at, with their sheet numbers. */
async function priorFindings(ids: number[]): Promise<Map<number, PriorFinding>> {
  if (ids.length === 0) return new Map();
  const rows = await db
    .select({ finding: findings, sheetNumber: scans.sheetNumber, decidedBy: users.name })
    .from(findings)
    .innerJoin(inspections, eq(inspections.id, findings.inspectionId))
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .leftJoin(users, eq(users.id, findings.decidedBy))
    .where(inArray(findings.id, [...new Set(ids)]));
  return new Map(
    rows
      .filter((r) => r.finding.decision === "accepted")
      .map((r) => [
        r.finding.id,
        { findingId: r.finding.id, inspectionId: r.finding.inspectionId, sheetNumber: r.sheetNumber, reason: r.finding.decisionReason, comment: r.finding.comment, decidedBy: r.decidedBy },
      ]),
  );
}

const mm = (um: number | null) => (um === null ? null : um / 1000);

export async function getSheetView(actor: Actor, inspectionId: number): Promise<SheetView> {
  const { inspection: i, scan, revision: r, job, customerName } = await loadSheetFor(actor, inspectionId, "inspection.read");
  const resource = { customerId: job.customerId };
  const rows = await db.select().from(findings).where(eq(findings.inspectionId, i.id));
  const deciderIds = [...new Set(rows.flatMap((f) => (f.decidedBy ? [f.decidedBy] : [])))];
  const names = new Map(
    deciderIds.length ? (await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, deciderIds))).map((u) => [u.id, u.name]) : [],
  );
  const priors = await priorFindings(rows.flatMap((f) => (f.priorFindingId ? [f.priorFindingId] : [])));
  const base = `/api/inspections/${i.id}`;
  const sorted = rows.sort((a, b) => b.areaUm2 - a.areaUm2 || a.id - b.id);
  const siblings = await db
    .select({ inspectionId: inspections.id, sheetNumber: scans.sheetNumber })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .where(eq(scans.jobId, job.id))
    .orderBy(desc(inspections.id));
  const open = i.verdict === "pending" && i.status === "done";
  const pageW = r.pageWidthUm / 1000, pageH = r.pageHeightUm / 1000;
  return {
    inspectionId: i.id,
    job: { id: job.id, jobNumber: job.jobNumber, title: job.title, customerName },
    sheetNumber: scan.sheetNumber,
    scanFileName: scan.originalFilename,
    artworkRevision: r.revision,
    status: i.status,
    verdict: i.verdict,
    finishedAt: i.finishedAt?.toISOString() ?? null,
    page: { widthMm: pageW, heightMm: pageH },
    ups: {
      rows: r.upsRows,
      columns: r.upsColumns,
      areaMm:
        r.upsAreaWUm && r.upsAreaHUm
          ? { x: (r.upsAreaXUm ?? 0) / 1000, y: (r.upsAreaYUm ?? 0) / 1000, w: r.upsAreaWUm / 1000, h: r.upsAreaHUm / 1000 }
          : { x: 0, y: 0, w: pageW, h: pageH },
    },
    coveredMm:
      i.coveredWUm && i.coveredHUm ? { x: mm(i.coveredXUm) ?? 0, y: mm(i.coveredYUm) ?? 0, w: i.coveredWUm / 1000, h: i.coveredHUm / 1000 } : null,
    alignment: { rotationDeg: i.rotationDeg, residualMm: mm(i.residualUm), correlation: i.correlation, driftDeltaE00: i.driftDeltaE00 },
    tiles:
      i.tilesStatus === "none"
        ? null
        : { status: i.tilesStatus, artwork: `${base}/tiles/artwork.dzi`, scan: `${base}/tiles/scan.dzi`, difference: `${base}/tiles/difference.dzi` },
    findings: sorted.map((f, n) => ({
      ...findingView(f),
      number: n + 1,
      reason: f.decisionReason,
      comment: f.comment,
      decidedBy: f.decidedBy ? (names.get(f.decidedBy) ?? null) : null,
      decidedAt: f.decidedAt?.toISOString() ?? null,
      version: f.version,
      recurrence: f.recurrence,
      prior: f.priorFindingId ? (priors.get(f.priorFindingId) ?? null) : null,
    })),
    signatures: await listSignatures(actor, i.id),
    siblings,
    may: {
      decide: open && can(actor, "finding.decide", resource),
      signoff: open && can(actor, "sheet.signoff", resource),
      reopen: i.verdict !== "pending" && can(actor, "sheet.reopen", resource),
    },
  };
}
