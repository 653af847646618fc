// The sheet's allowances from a sample of its pixels (lib/imaging/compare/allowances.ts): on edges, the level that all
// but one in ten thousand of them need no more than, kept between the default and the most forgiven.
import { describe, expect, it } from "vitest";
import { EDGE_ALLOWANCE, EDGE_SAMPLE_STEPS, FLAT_SAMPLE_STEPS, newSheetSample, type SheetSample } from "@/lib/imaging/compare/compare";
import { edgeAllowanceFrom as allowanceFrom, flatAllowanceFrom } from "@/lib/imaging/compare/allowances";

function sample(edgePixels: number, needs: [number, number][]): SheetSample {
  const s = newSheetSample();
  s.edgePixels = edgePixels;
  for (const [level, count] of needs) s.edgeNeeded[Math.min(EDGE_SAMPLE_STEPS, Math.floor(level * EDGE_SAMPLE_STEPS))] += count;
  return s;
}

describe("edge allowance", () => {
  it("keeps the default where the sheet's edges match the artwork's", () => {
    expect(allowanceFrom(sample(100_000, [[0.05, 5000], [0.1, 50]]))).toBe(EDGE_ALLOWANCE);
  });

  it("rises to what all but 0.01 % of the edge pixels need", () => {
    // 2 % need 0.2, 0.5 % need 0.3, 0.005 % need 0.6 (a defect): the level is 0.3, not 0.6.
    const level = allowanceFrom(sample(100_000, [[0.2, 2000], [0.305, 500], [0.6, 5]]));
    expect(level).toBeCloseTo(0.31, 5);
  });

  it("never forgives more than 0.45 of an edge's contrast, and keeps the default on too few edge pixels", () => {
    expect(allowanceFrom(sample(100_000, [[0.9, 5000]]))).toBe(0.45);
    expect(allowanceFrom(sample(500, [[0.4, 400]]))).toBe(EDGE_ALLOWANCE);
  });

  it("forgives on a flat tone how far its noise reaches past the profile's level, at most the level again", () => {
    const s = newSheetSample();
    // Tone 2: 100 000 flat pixels, 2 % at ΔE00 3.05 and 0.5 % at 4.55 (a tint's moiré), 0.01 % at ΔE00 20 (a
    // defect). Tone 7 (paper white): quiet.
    s.flatPixels[2] = 100_000;
    s.flatDeltaE[2 * (FLAT_SAMPLE_STEPS + 1) + 30] = 2000;
    s.flatDeltaE[2 * (FLAT_SAMPLE_STEPS + 1) + 45] = 500;
    s.flatDeltaE[2 * (FLAT_SAMPLE_STEPS + 1) + 200] = 10;
    s.flatPixels[7] = 100_000;
    s.flatDeltaE[7 * (FLAT_SAMPLE_STEPS + 1) + 15] = 500;
    const flat = flatAllowanceFrom(s, 4);
    expect(flat[2]).toBeCloseTo(4.6 - 4, 5);
    expect(flat[7]).toBe(0);
    // A long defect holding 0.3 % of the tone's pixels does not raise it: the level is bounded by 1.6 × the
    // level 1 % of the pixels reach (3.1).
    s.flatDeltaE[2 * (FLAT_SAMPLE_STEPS + 1) + 250] = 300;
    expect(flatAllowanceFrom(s, 4)[2]).toBeCloseTo(1.6 * 3.1 - 4, 5);
  });
});
