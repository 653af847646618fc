// Keeps the run memory of findings (findings.prior_finding_id, findings.recurrence) up to date: recomputed for the
// whole run, inside the caller's transaction, whenever findings are written (the worker) or decided (a reviewer).
// The run is read in one query and only rows whose values change are written, in one statement. Neither column
// is part of a sheet's signed record.
import { and, eq, inArray, isNotNull, sql } from "drizzle-orm";
import type { Db, Tx } from "@/db/client";
import { artworkRevisions, findings, inspections, scans, toleranceProfiles } from "@/db/schema";
import { runMemory, type MemoryFinding, type MemoryResult, type RunGeometry } from "./memory";

type StoredFinding = MemoryFinding & { recurrence: MemoryResult["recurrence"] | null };

/** One run as run memory sees it: its geometry, its newest done inspections and their findings as stored. */
export interface RunState {
  geometry: Omit<RunGeometry, "toleranceUm">;
  sheets: { id: number; sheetNumber: number | null; toleranceUm: number }[];
  findings: StoredFinding[];
}

/** The run (artwork revision) in one query; null when the revision does not exist. */
export async function loadRun(executor: Db | Tx, revisionId: number): Promise<RunState | null> {
  const rows = await executor
    .select({
      upsRows: artworkRevisions.upsRows,
      upsColumns: artworkRevisions.upsColumns,
      upsAreaXUm: artworkRevisions.upsAreaXUm,
      upsAreaYUm: artworkRevisions.upsAreaYUm,
      upsAreaWUm: artworkRevisions.upsAreaWUm,
      upsAreaHUm: artworkRevisions.upsAreaHUm,
      pageWidthUm: artworkRevisions.pageWidthUm,
      pageHeightUm: artworkRevisions.pageHeightUm,
      inspectionId: inspections.id,
      scanId: inspections.scanId,
      status: inspections.status,
      sheetNumber: scans.sheetNumber,
      toleranceUm: toleranceProfiles.registrationToleranceUm,
      finding: {
        id: findings.id,
        inspectionId: findings.inspectionId,
        kind: findings.kind,
        xUm: findings.xUm,
        yUm: findings.yUm,
        wUm: findings.wUm,
        hUm: findings.hUm,
        upIndex: findings.upIndex,
        decision: findings.decision,
        priorFindingId: findings.priorFindingId,
        recurrence: findings.recurrence,
      },
    })
    .from(artworkRevisions)
    .leftJoin(scans, eq(scans.artworkRevisionId, artworkRevisions.id))
    .leftJoin(inspections, eq(inspections.scanId, scans.id))
    .leftJoin(toleranceProfiles, eq(toleranceProfiles.id, inspections.toleranceProfileId))
    .leftJoin(findings, eq(findings.inspectionId, inspections.id))
    .where(eq(artworkRevisions.id, revisionId));
  const first = rows[0];
  if (!first) return null;
  // The newest inspection of each scan is the sheet's; only finished ones take part.
  const newest = new Map<number, (typeof rows)[number]>();
  for (const r of rows) if (r.scanId !== null && (newest.get(r.scanId)?.inspectionId ?? 0) < r.inspectionId!) newest.set(r.scanId, r);
  const sheets = [...newest.values()].filter((r) => r.status === "done").map((r) => ({ id: r.inspectionId!, sheetNumber: r.sheetNumber, toleranceUm: r.toleranceUm! }));
  const done = new Set(sheets.map((s) => s.id));
  return {
    geometry: {
      upsRows: first.upsRows,
      upsColumns: first.upsColumns,
      upsArea:
        first.upsAreaWUm && first.upsAreaHUm
          ? { x: first.upsAreaXUm ?? 0, y: first.upsAreaYUm ?? 0, w: first.upsAreaWUm, h: first.upsAreaHUm }
          : { x: 0, y: 0, w: first.pageWidthUm, h: first.pageHeightUm },
    },
    sheets,
    findings: rows.flatMap((r) => (r.finding && done.has(r.finding.inspectionId) ? [r.finding as StoredFinding] : [])),
  };
}

export type MemoryChange = MemoryResult & { id: number };

/** The findings whose stored run memory differs from the run's memory now. */
export function memoryChanges(run: RunState): MemoryChange[] {
  if (run.sheets.length === 0) return [];
  const memory = runMemory(
    run.findings,
    run.sheets.filter((s) => s.sheetNumber !== null).map((s) => ({ inspectionId: s.id, sheetNumber: s.sheetNumber! })),
    // One tolerance for the run: the widest of the profiles its sheets were inspected with.
    { ...run.geometry, toleranceUm: Math.max(...run.sheets.map((s) => s.toleranceUm)) },
  );
  const changes: MemoryChange[] = [];
  for (const f of run.findings) {
    const next = memory.get(f.id);
    if (next && (next.priorFindingId !== f.priorFindingId || next.recurrence !== f.recurrence)) changes.push({ id: f.id, ...next });
  }
  return changes;
}

/** Rows per statement: one round trip for a sheet's worth of changes, bounded for a long run. */
const ROWS_PER_UPDATE = 500;

/** Writes the changes, one UPDATE (with a CASE per column) for up to ROWS_PER_UPDATE findings. */
export async function writeMemory(executor: Db | Tx, changes: readonly MemoryChange[]): Promise<void> {
  for (let at = 0; at < changes.length; at += ROWS_PER_UPDATE) {
    const chunk = changes.slice(at, at + ROWS_PER_UPDATE);
    const caseOf = (value: (c: MemoryChange) => number | string | null) =>
      sql`case ${findings.id} ${sql.join(chunk.map((c) => sql`when ${c.id} then ${value(c)}`), sql` `)} end`;
    await executor
      .update(findings)
      .set({ priorFindingId: caseOf((c) => c.priorFindingId), recurrence: caseOf((c) => c.recurrence) })
      .where(inArray(findings.id, chunk.map((c) => c.id)));
  }
}

export async function refreshRunMemory(executor: Db | Tx, revisionId: number): Promise<void> {
  const run = await loadRun(executor, revisionId);
  if (run) await writeMemory(executor, memoryChanges(run));
}

/** The run (artwork revision) an inspection belongs to. */
export async function revisionOfInspection(executor: Db | Tx, inspectionId: number): Promise<number | null> {
  const [row] = await executor
    .select({ revisionId: scans.artworkRevisionId })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .where(and(eq(inspections.id, inspectionId), isNotNull(scans.artworkRevisionId)));
  return row?.revisionId ?? null;
}
