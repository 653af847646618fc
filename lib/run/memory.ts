// Run memory: what a press run already showed about a place on the sheet. Pure: findings of one run in, per finding
// the earlier accepted finding it resembles (a suggestion a reviewer confirms, never applied alone) and how it
// recurs: once (isolated: a hickey, dust, a pen mark), at the same place on three or more consecutive inspected
// sheets (repeating: plate, blanket or artwork), or at the same place of every up (every_up: artwork or plate).
// Tympan's own rule for "the same place": the two boxes overlap, or the gap between them is at most the profile's
// registration tolerance on both axes (common practice, no published source). A suggestion needs the same kind and up as well; recurrence
// looks at the place only (one plate fault may read as extra ink on one sheet and a colour shift on the next).

export type Recurrence = "isolated" | "repeating" | "every_up";

export interface MemoryFinding {
  id: number;
  inspectionId: number;
  kind: string;
  xUm: number;
  yUm: number;
  wUm: number;
  hUm: number;
  /** 1-based, row-major; null outside every up. */
  upIndex: number | null;
  decision: "pending" | "accepted" | "rejected";
  /** As stored: a decided finding keeps the suggestion it was decided with. */
  priorFindingId: number | null;
}

export interface MemorySheet {
  inspectionId: number;
  sheetNumber: number;
}

export interface RunGeometry {
  toleranceUm: number;
  upsRows: number;
  upsColumns: number;
  /** The rectangle the ups fill, µm from the top-left of the trim box. */
  upsArea: { x: number; y: number; w: number; h: number };
}

export interface MemoryResult {
  priorFindingId: number | null;
  recurrence: Recurrence;
}

interface Box {
  x: number;
  y: number;
  w: number;
  h: number;
}

/** The boxes are at most `tolerance` apart on both axes (overlapping boxes are 0 apart). */
export function samePlace(a: Box, b: Box, tolerance: number): boolean {
  const gapX = Math.max(a.x, b.x) - Math.min(a.x + a.w, b.x + b.w);
  const gapY = Math.max(a.y, b.y) - Math.min(a.y + a.h, b.y + b.h);
  return gapX <= tolerance && gapY <= tolerance;
}

/** The finding's box measured from the top-left of its own up, so places in different ups compare. */
function inUp(f: MemoryFinding, g: RunGeometry): Box | null {
  if (f.upIndex === null || g.upsColumns < 1 || g.upsRows < 1) return null;
  const column = (f.upIndex - 1) % g.upsColumns;
  const row = Math.floor((f.upIndex - 1) / g.upsColumns);
  const cellW = g.upsArea.w / g.upsColumns;
  const cellH = g.upsArea.h / g.upsRows;
  return { x: f.xUm - (g.upsArea.x + column * cellW), y: f.yUm - (g.upsArea.y + row * cellH), w: f.wUm, h: f.hUm };
}

const box = (f: MemoryFinding): Box => ({ x: f.xUm, y: f.yUm, w: f.wUm, h: f.hUm });

/**
 * Run memory for every finding of a run. `sheets` are the run's inspected sheets with a sheet number (the order of
 * the run); findings of other inspections get no prior and are only checked for "in every up".
 */
export function runMemory(findings: readonly MemoryFinding[], sheets: readonly MemorySheet[], geometry: RunGeometry): Map<number, MemoryResult> {
  const tol = geometry.toleranceUm;
  const order = [...sheets].sort((a, b) => a.sheetNumber - b.sheetNumber);
  const position = new Map(order.map((s, i) => [s.inspectionId, i]));
  const bySheet = new Map<number, MemoryFinding[]>();
  for (const f of findings) bySheet.set(f.inspectionId, [...(bySheet.get(f.inspectionId) ?? []), f]);
  const onSheet = (i: number) => bySheet.get(order[i]?.inspectionId) ?? [];
  const sameUpAndPlace = (a: MemoryFinding, b: MemoryFinding) => a.upIndex === b.upIndex && samePlace(box(a), box(b), tol);

  // Longest chain of consecutive inspected sheets through each finding: back (ending here) + ahead (starting here).
  const back = new Map<number, number>();
  for (let i = 0; i < order.length; i++) {
    for (const f of onSheet(i)) back.set(f.id, 1 + Math.max(0, ...onSheet(i - 1).filter((g) => sameUpAndPlace(f, g)).map((g) => back.get(g.id) ?? 0)));
  }
  const ahead = new Map<number, number>();
  for (let i = order.length - 1; i >= 0; i--) {
    for (const f of onSheet(i)) ahead.set(f.id, 1 + Math.max(0, ...onSheet(i + 1).filter((g) => sameUpAndPlace(f, g)).map((g) => ahead.get(g.id) ?? 0)));
  }

  const ups = geometry.upsRows * geometry.upsColumns;
  const inEveryUp = (f: MemoryFinding): boolean => {
    const own = inUp(f, geometry);
    if (!own || ups < 2) return false;
    const others = (bySheet.get(f.inspectionId) ?? []).filter((g) => g.upIndex !== null && g.upIndex !== f.upIndex);
    for (let up = 1; up <= ups; up++) {
      if (up === f.upIndex) continue;
      const match = others.some((g) => g.upIndex === up && samePlace(own, inUp(g, geometry)!, tol));
      if (!match) return false;
    }
    return true;
  };

  // Accepted findings by sheet position, for the nearest earlier one of the same kind at the same place.
  const accepted = findings.filter((f) => f.decision === "accepted" && position.has(f.inspectionId));
  const result = new Map<number, MemoryResult>();
  for (const f of findings) {
    const at = position.get(f.inspectionId);
    let prior = f.priorFindingId;
    if (f.decision === "pending") {
      prior = null;
      if (at !== undefined) {
        let best = -1;
        for (const g of accepted) {
          const gAt = position.get(g.inspectionId)!;
          if (gAt < at && gAt > best && g.kind === f.kind && sameUpAndPlace(f, g)) {
            best = gAt;
            prior = g.id;
          }
        }
      }
    }
    const chain = at === undefined ? 1 : (back.get(f.id) ?? 1) + (ahead.get(f.id) ?? 1) - 1;
    const recurrence: Recurrence = inEveryUp(f) ? "every_up" : chain >= 3 ? "repeating" : "isolated";
    result.set(f.id, { priorFindingId: prior, recurrence });
  }
  return result;
}
