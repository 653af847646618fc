// The sheet's edge allowance from a sample of edge pixels (lib/imaging/edge-allowance.ts): the level that all
// but one in a thousand of them need no more than, kept between the default and the most forgiven.
import { describe, expect, it } from "vitest";
import { EDGE_ALLOWANCE, EDGE_SAMPLE_STEPS, type EdgeSample } from "@/lib/imaging/compare";
import { allowanceFrom } from "@/lib/imaging/edge-allowance";

function sample(edgePixels: number, needs: [number, number][]): EdgeSample {
  const needed = new Float64Array(EDGE_SAMPLE_STEPS + 1);
  for (const [level, count] of needs) needed[Math.min(EDGE_SAMPLE_STEPS, Math.floor(level * EDGE_SAMPLE_STEPS))] += count;
  return { edgePixels, needed };
}

describe("edge allowance", () => {
  it("keeps the default where the sheet's edges match the artwork's", () => {
    expect(allowanceFrom(sample(100_000, [[0.05, 5000], [0.1, 50]]))).toBe(EDGE_ALLOWANCE);
  });

  it("rises to what all but 0.1 % of the edge pixels need", () => {
    // 2 % need 0.2, 0.5 % need 0.3, 0.05 % need 0.6 (a defect): the level is 0.3, not 0.6.
    const level = allowanceFrom(sample(100_000, [[0.2, 2000], [0.305, 500], [0.6, 50]]));
    expect(level).toBeCloseTo(0.31, 5);
  });

  it("never forgives more than 0.45 of an edge's contrast, and keeps the default on too few edge pixels", () => {
    expect(allowanceFrom(sample(100_000, [[0.9, 5000]]))).toBe(0.45);
    expect(allowanceFrom(sample(500, [[0.4, 400]]))).toBe(EDGE_ALLOWANCE);
  });
});
