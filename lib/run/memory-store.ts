// Keeps the run memory of findings (findings.prior_finding_id, findings.recurrence) up to date: recomputed for the
// whole run, inside the caller's transaction, whenever findings are written (the worker) or decided (a reviewer).
// Only rows whose values change are written. Neither column is part of a sheet's signed record.
import { and, eq, inArray, isNotNull } from "drizzle-orm";
import type { Db, Tx } from "@/db/client";
import { artworkRevisions, findings, inspections, scans, toleranceProfiles } from "@/db/schema";
import { runMemory, type MemoryFinding } from "./memory";

/** The newest inspection of each scan of the run, with the scan's sheet number. */
export async function runInspections(executor: Db | Tx, revisionId: number) {
  const rows = await executor
    .select({ id: inspections.id, scanId: inspections.scanId, status: inspections.status, sheetNumber: scans.sheetNumber, toleranceUm: toleranceProfiles.registrationToleranceUm })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .innerJoin(toleranceProfiles, eq(toleranceProfiles.id, inspections.toleranceProfileId))
    .where(eq(scans.artworkRevisionId, revisionId));
  const newest = new Map<number, (typeof rows)[number]>();
  for (const r of rows) if ((newest.get(r.scanId)?.id ?? 0) < r.id) newest.set(r.scanId, r);
  return [...newest.values()];
}

export async function refreshRunMemory(tx: Db | Tx, revisionId: number): Promise<void> {
  const [revision] = await tx.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId));
  if (!revision) return;
  const sheets = (await runInspections(tx, revisionId)).filter((r) => r.status === "done");
  if (sheets.length === 0) return;
  const rows = await tx
    .select()
    .from(findings)
    .where(inArray(findings.inspectionId, sheets.map((s) => s.id)));
  const memory = runMemory(
    rows as MemoryFinding[],
    sheets.filter((s) => s.sheetNumber !== null).map((s) => ({ inspectionId: s.id, sheetNumber: s.sheetNumber! })),
    {
      // One tolerance for the run: the widest of the profiles its sheets were inspected with.
      toleranceUm: Math.max(...sheets.map((s) => s.toleranceUm)),
      upsRows: revision.upsRows,
      upsColumns: revision.upsColumns,
      upsArea:
        revision.upsAreaWUm && revision.upsAreaHUm
          ? { x: revision.upsAreaXUm ?? 0, y: revision.upsAreaYUm ?? 0, w: revision.upsAreaWUm, h: revision.upsAreaHUm }
          : { x: 0, y: 0, w: revision.pageWidthUm, h: revision.pageHeightUm },
    },
  );
  for (const f of rows) {
    const next = memory.get(f.id);
    if (!next || (next.priorFindingId === f.priorFindingId && next.recurrence === f.recurrence)) continue;
    await tx.update(findings).set({ priorFindingId: next.priorFindingId, recurrence: next.recurrence }).where(eq(findings.id, f.id));
  }
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
