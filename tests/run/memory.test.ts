// Run memory (lib/run/memory.ts), worked by hand on an invented two-up run (each up 100 mm wide, registration
// tolerance 0.15 mm as in the standard-food profile). "The same place" is Tympan's own rule (common practice, no
// published source): boxes overlapping or at most the tolerance apart; three consecutive inspected sheets make a
// repeating finding; the same place in every up makes one "in every up".
import { describe, expect, it } from "vitest";
import { runMemory, samePlace, type MemoryFinding, type MemorySheet } from "@/lib/run/memory";

const geometry = { toleranceUm: 150, upsRows: 1, upsColumns: 2, upsArea: { x: 0, y: 0, w: 200_000, h: 120_000 } };
let nextId = 1;
const finding = (inspectionId: number, over: Partial<MemoryFinding> = {}): MemoryFinding => ({
  id: nextId++,
  inspectionId,
  kind: "extra_ink",
  xUm: 40_000,
  yUm: 30_000,
  wUm: 1000,
  hUm: 1000,
  upIndex: 1,
  decision: "pending",
  priorFindingId: null,
  ...over,
});
const sheets = (...numbers: number[]): MemorySheet[] => numbers.map((n, i) => ({ inspectionId: 100 + i, sheetNumber: n }));

describe("the same place", () => {
  it("overlapping boxes, or boxes at most the tolerance apart, are at the same place; 0.2 mm apart is not", () => {
    const a = { x: 0, y: 0, w: 1000, h: 1000 };
    expect(samePlace(a, { x: 500, y: 500, w: 1000, h: 1000 }, 150)).toBe(true);
    expect(samePlace(a, { x: 1150, y: 0, w: 1000, h: 1000 }, 150)).toBe(true);
    expect(samePlace(a, { x: 1200, y: 0, w: 1000, h: 1000 }, 150)).toBe(false);
    expect(samePlace(a, { x: 0, y: 1200, w: 1000, h: 1000 }, 150)).toBe(false);
  });
});

describe("accepted on an earlier sheet", () => {
  it("a pending finding of the same kind, up and place on a later sheet points at the accepted one; other kinds, ups or places do not", () => {
    const run = sheets(10, 11);
    const accepted = finding(100, { decision: "accepted" });
    const same = finding(101, { xUm: 40_100 });
    const otherKind = finding(101, { kind: "colour_shift" });
    const otherUp = finding(101, { upIndex: 2, xUm: 40_000 });
    const elsewhere = finding(101, { xUm: 60_000 });
    const memory = runMemory([accepted, same, otherKind, otherUp, elsewhere], run, geometry);
    expect(memory.get(same.id)?.priorFindingId).toBe(accepted.id);
    expect(memory.get(otherKind.id)?.priorFindingId).toBeNull();
    expect(memory.get(otherUp.id)?.priorFindingId).toBeNull();
    expect(memory.get(elsewhere.id)?.priorFindingId).toBeNull();
    expect(memory.get(accepted.id)?.priorFindingId).toBeNull();
  });

  it("only earlier sheets count (by sheet number, not upload order), the nearest wins, rejected ones never", () => {
    // Sheet 30 was uploaded first (inspection 100) but is later in the run than sheet 20.
    const run: MemorySheet[] = [
      { inspectionId: 100, sheetNumber: 30 },
      { inspectionId: 101, sheetNumber: 20 },
      { inspectionId: 102, sheetNumber: 25 },
      { inspectionId: 103, sheetNumber: 40 },
    ];
    const on30 = finding(100, { decision: "accepted" });
    const on20 = finding(101);
    const on25 = finding(102, { decision: "accepted" });
    const on40 = finding(103);
    const rejectedOnly = runMemory([finding(101, { decision: "rejected" }), finding(102)], run, geometry);
    const memory = runMemory([on30, on20, on25, on40], run, geometry);
    expect(memory.get(on20.id)?.priorFindingId).toBeNull();
    expect(memory.get(on40.id)?.priorFindingId).toBe(on30.id);
    expect([...rejectedOnly.values()].every((m) => m.priorFindingId === null)).toBe(true);
  });

  it("a decided finding keeps the suggestion it was decided with; an undone accept no longer suggests", () => {
    const run = sheets(1, 2);
    const confirmed = finding(101, { decision: "accepted", priorFindingId: 999 });
    const memory = runMemory([finding(100, { decision: "pending" }), confirmed], run, geometry);
    expect(memory.get(confirmed.id)?.priorFindingId).toBe(999);
    const pending = finding(101);
    expect(runMemory([finding(100, { decision: "pending" }), pending], run, geometry).get(pending.id)?.priorFindingId).toBeNull();
  });
});

describe("recurrence", () => {
  it("the same place on three consecutive inspected sheets is repeating; on two, or with a gap, isolated", () => {
    const run = sheets(1, 2, 3, 4, 5);
    const three = [finding(100), finding(101, { kind: "colour_shift" }), finding(102)];
    const memory = runMemory(three, run, geometry);
    expect(three.map((f) => memory.get(f.id)?.recurrence)).toEqual(["repeating", "repeating", "repeating"]);
    const gap = [finding(100), finding(101), finding(103)];
    const withGap = runMemory(gap, run, geometry);
    expect(gap.map((f) => withGap.get(f.id)?.recurrence)).toEqual(["isolated", "isolated", "isolated"]);
  });

  it("the same place measured from each up's corner in both ups is 'in every up'; in one up only it is not", () => {
    const run = sheets(7);
    const left = finding(100, { upIndex: 1, xUm: 40_000 });
    const right = finding(100, { upIndex: 2, xUm: 140_050 });
    const lone = finding(100, { upIndex: 1, xUm: 70_000, yUm: 90_000 });
    const memory = runMemory([left, right, lone], run, geometry);
    expect(memory.get(left.id)?.recurrence).toBe("every_up");
    expect(memory.get(right.id)?.recurrence).toBe("every_up");
    expect(memory.get(lone.id)?.recurrence).toBe("isolated");
  });

  it("a one-up sheet never says 'in every up'", () => {
    const single = { ...geometry, upsColumns: 1 };
    const f = finding(100);
    expect(runMemory([f], sheets(1), single).get(f.id)?.recurrence).toBe("isolated");
  });
});
