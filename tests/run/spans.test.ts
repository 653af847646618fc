// The span to pull (lib/run/spans.ts). The rule itself is the plant's: pull from the sheet after the last passed
// sheet before a failed one to the sheet before the next passed sheet after it (common practice, no published
// source). Hand-worked examples first, then properties checked by fast-check over random runs.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { describeSampling, describeSpan, spanLength, spansToPull, type SheetVerdict, type Verdict } from "@/lib/run/spans";

const run = (...pairs: [number, Verdict][]): SheetVerdict[] => pairs.map(([sheetNumber, verdict]) => ({ sheetNumber, verdict }));

describe("spans to pull, worked by hand", () => {
  it("a failed sheet between two passed ones: the sheets strictly between them", () => {
    // passed 100, failed 150, passed 200 → pull 101…199 (99 sheets).
    const spans = spansToPull(run([100, "passed"], [150, "failed"], [200, "passed"]));
    expect(spans).toEqual([{ from: 101, to: 199, failedSheets: [150] }]);
    expect(spanLength(spans[0])).toBe(99);
    expect(describeSpan(spans[0])).toBe("sheets 101 to 199");
  });

  it("no passed sheet before: open at the start; none after: open at the end", () => {
    expect(spansToPull(run([40, "failed"], [80, "passed"]))).toEqual([{ from: null, to: 79, failedSheets: [40] }]);
    expect(spansToPull(run([80, "passed"], [120, "failed"]))).toEqual([{ from: 81, to: null, failedSheets: [120] }]);
    expect(spansToPull(run([5, "failed"]))).toEqual([{ from: null, to: null, failedSheets: [5] }]);
    expect(describeSpan({ from: null, to: 79, failedSheets: [] })).toBe("from the start of the run to sheet 79");
    expect(describeSpan({ from: 81, to: null, failedSheets: [] })).toBe("sheet 81 to the end of the run");
  });

  it("sheets not signed yet do not bound a span; two failed sheets with no pass between share one span", () => {
    // 10 passed, 20 failed, 30 pending, 40 failed, 50 passed → one span 11…49 for sheets 20 and 40.
    expect(spansToPull(run([10, "passed"], [20, "failed"], [30, "pending"], [40, "failed"], [50, "passed"]))).toEqual([
      { from: 11, to: 49, failedSheets: [20, 40] },
    ]);
  });

  it("a passed sheet between two failed ones keeps two spans; adjacent failed sheets give a one-sheet span each", () => {
    expect(spansToPull(run([1, "passed"], [2, "failed"], [3, "passed"], [4, "failed"], [5, "passed"]))).toEqual([
      { from: 2, to: 2, failedSheets: [2] },
      { from: 4, to: 4, failedSheets: [4] },
    ]);
    expect(describeSpan({ from: 2, to: 2, failedSheets: [2] })).toBe("sheet 2");
  });

  it("the input order does not matter (sheets arrive in any order)", () => {
    expect(spansToPull(run([200, "passed"], [150, "failed"], [100, "passed"]))).toEqual([{ from: 101, to: 199, failedSheets: [150] }]);
  });

  it("sampling in words: 23 of 400 sheets is about one in 17 (400 / 23 = 17.4)", () => {
    expect(describeSampling(23, 400)).toBe("23 of 400 sheets, about one in 17");
    expect(describeSampling(5, 5)).toBe("5 of 5 sheets, about one in 1");
    expect(describeSampling(3, null)).toBe("3 sheets inspected (run length not set)");
  });
});

const verdict = fc.constantFrom<Verdict>("pending", "passed", "failed");
const runs = fc.uniqueArray(fc.record({ sheetNumber: fc.integer({ min: 1, max: 5000 }), verdict }), { selector: (s) => s.sheetNumber, maxLength: 60 });
const inside = (n: number, s: { from: number | null; to: number | null }) => (s.from === null || n >= s.from) && (s.to === null || n <= s.to);

describe("spans to pull, properties (fast-check)", () => {
  it("every failed sheet is inside exactly one span; no passed sheet is inside any", () => {
    fc.assert(
      fc.property(runs, (sheets) => {
        const spans = spansToPull(sheets);
        for (const s of sheets) {
          const holding = spans.filter((span) => inside(s.sheetNumber, span)).length;
          if (s.verdict === "failed") expect(holding).toBe(1);
          if (s.verdict === "passed") expect(holding).toBe(0);
        }
      }),
      { numRuns: 500 },
    );
  });

  it("spans are sorted, apart (never touching) and each is as wide as it may be: bounded by a passed sheet or open", () => {
    fc.assert(
      fc.property(runs, (sheets) => {
        const spans = spansToPull(sheets);
        const passed = new Set(sheets.filter((s) => s.verdict === "passed").map((s) => s.sheetNumber));
        spans.forEach((span, i) => {
          if (span.from !== null) expect(passed.has(span.from - 1)).toBe(true);
          if (span.to !== null) expect(passed.has(span.to + 1)).toBe(true);
          const next = spans[i + 1];
          if (next) expect(span.to !== null && next.from !== null && next.from > span.to + 1).toBe(true);
        });
        expect(spans.flatMap((s) => s.failedSheets).length).toBe(sheets.filter((s) => s.verdict === "failed").length);
      }),
      { numRuns: 500 },
    );
  });
});
