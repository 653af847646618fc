// Run memory in the database (lib/run/memory-store.ts through lib/review/decisions.ts): accepting a finding on
// one sheet pre-marks the finding at the same place on later sheets ("accepted on sheet N") without deciding it;
// confirming it is an ordinary decision whose audit event names the suggestion; undoing the first accept takes the
// suggestion back; three consecutive sheets with a finding at one place label it repeating; a finding at the same
// place of both ups is "in every up". Invented run of two-up sheets (standard-food: registration tolerance 0.15 mm).
import "../pipeline/support/test-env";
import { and, eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { auditEvents, findings } from "@/db/schema";
import { closeQueues } from "@/lib/queue/queues";
import { decideFinding, undoDecision } from "@/lib/review/decisions";
import { getSheetView } from "@/lib/review/sheet";
import { loadRun, memoryChanges, refreshRunMemory } from "@/lib/run/memory-store";
import { getRunView } from "@/lib/run/traceability";
import { makeRun, type RunFixture } from "./support";

let run: RunFixture;
const row = async (id: number) => (await db.select().from(findings).where(eq(findings.id, id)))[0];
const sheet = (n: number) => run.sheets.find((s) => s.sheetNumber === n)!;

beforeAll(async () => {
  // Sheets 11–14 have a spot at (40 mm, 30 mm) in up 1; sheet 11 also one at (70, 90) in up 1 and the same place of
  // up 2 (the ups are 100 mm wide: 170 mm); sheet 13's spot sits 1.1 mm right, still overlapping; sheet 15 has none there.
  run = await makeRun([
    { sheetNumber: 11, findings: [[40_000, 30_000, 1], [70_000, 90_000, 1], [170_000, 90_000, 2]] },
    { sheetNumber: 12, findings: [[40_200, 30_100, 1]] },
    { sheetNumber: 13, findings: [[41_300, 30_000, 1]] },
    { sheetNumber: 14, findings: [[40_000, 29_500, 1]] },
    { sheetNumber: 15, findings: [[10_000, 10_000, 2]] },
  ]);
  await refreshRunMemory(db, run.revisionId);
});
afterAll(async () => {
  await closeQueues();
  await closeDb();
});

describe("run memory", () => {
  it("labels the spot on four consecutive sheets repeating, the pair at one place of both ups in every up, the rest isolated", async () => {
    const [spot11, pair1, pair2] = sheet(11).findingIds;
    expect((await row(spot11)).recurrence).toBe("repeating");
    expect((await row(sheet(14).findingIds[0])).recurrence).toBe("repeating");
    expect((await row(pair1)).recurrence).toBe("every_up");
    expect((await row(pair2)).recurrence).toBe("every_up");
    expect((await row(sheet(15).findingIds[0])).recurrence).toBe("isolated");
    const view = await getRunView(run.actors.reviewer, run.jobId);
    expect(view.sheets.find((s) => s.sheetNumber === 11)).toMatchObject({ repeatingFindings: 1, everyUpFindings: 2 });
  });

  it("an accept on sheet 11 pre-marks the same place on later sheets, deciding nothing", async () => {
    const first = sheet(11).findingIds[0];
    await decideFinding(run.actors.reviewer, { inspectionId: sheet(11).inspectionId, findingId: first, version: 0, decision: "accepted", reason: "within_tolerance", comment: "Small hickey, below the plant's limit" });
    const later = await row(sheet(12).findingIds[0]);
    expect(later).toMatchObject({ priorFindingId: first, decision: "pending", version: 0 });
    expect((await row(sheet(15).findingIds[0])).priorFindingId).toBeNull();
    const view = await getSheetView(run.actors.reviewer, sheet(12).inspectionId);
    expect(view.findings[0].prior).toMatchObject({ findingId: first, sheetNumber: 11, reason: "within_tolerance", comment: "Small hickey, below the plant's limit" });
    expect(view.findings[0].recurrence).toBe("repeating");
  });

  it("confirming the suggestion is a decision of the reviewer, audited with the finding it followed; the next sheet then points at it", async () => {
    const id = sheet(12).findingIds[0];
    await decideFinding(run.actors.reviewer, { inspectionId: sheet(12).inspectionId, findingId: id, version: 0, decision: "accepted", reason: "within_tolerance", comment: "As accepted on sheet 11.", confirmsPrior: true });
    const [event] = await db.select().from(auditEvents).where(and(eq(auditEvents.action, "finding.decide"), eq(auditEvents.subjectId, String(id))));
    expect(event.details).toMatchObject({ to: "accepted", confirmsPriorFindingId: sheet(11).findingIds[0] });
    // The nearest earlier accepted finding is the one suggested.
    expect((await row(sheet(13).findingIds[0])).priorFindingId).toBe(id);
  });

  it("undoing the accepts takes the suggestions back", async () => {
    const id12 = sheet(12).findingIds[0];
    await undoDecision(run.actors.reviewer, { inspectionId: sheet(12).inspectionId, findingId: id12, version: 1 });
    expect((await row(sheet(13).findingIds[0])).priorFindingId).toBe(sheet(11).findingIds[0]);
    await undoDecision(run.actors.reviewer, { inspectionId: sheet(11).inspectionId, findingId: sheet(11).findingIds[0], version: 1 });
    expect((await row(id12)).priorFindingId).toBeNull();
    expect((await row(sheet(13).findingIds[0])).priorFindingId).toBeNull();
  });
});

describe("run memory under concurrent decisions", () => {
  it("sixteen decisions sent at once on one run leave the memory a full recompute gives (nothing left to change)", async () => {
    // Sixteen sheets with a finding at one place of up 1: every accept changes the suggestion of every later sheet.
    const busy = await makeRun(Array.from({ length: 16 }, (_, k) => ({ sheetNumber: 101 + k, findings: [[40_000 + 30 * k, 30_000, 1]] as [number, number, number][] })));
    await refreshRunMemory(db, busy.revisionId);
    // Every other sheet accepted, the rest rejected, all at once (the pool gives them their own connections).
    const results = await Promise.all(
      busy.sheets.map((s, k) =>
        decideFinding(busy.actors.reviewer, {
          inspectionId: s.inspectionId,
          findingId: s.findingIds[0],
          version: 0,
          ...(k % 2 === 0 ? { decision: "accepted", reason: "within_tolerance" } : { decision: "rejected", reason: "defect", comment: "Hickey in up 1." }),
        } as Parameters<typeof decideFinding>[1]),
      ),
    );
    expect(results.every((r) => r.version === 1)).toBe(true);
    const run = await loadRun(db, busy.revisionId);
    expect(memoryChanges(run!)).toEqual([]);
    // And what the recompute gives, spelled out: a rejected sheet (odd positions) kept the suggestion it was decided
    // with, which was one of the accepted sheets before it or none; the recurrence is the same spot on 16 sheets.
    const rows = await db.select().from(findings).where(inArray(findings.inspectionId, busy.sheets.map((s) => s.inspectionId)));
    expect(rows.every((r) => r.recurrence === "repeating")).toBe(true);
    expect(rows.filter((r) => r.decision === "accepted")).toHaveLength(8);
  });
});

