// The press-sim evaluator's scoring rules, on hand-made runs (issue 10's definitions: a box touching the defect
// ± 1 mm is found loosely; tightly when its area is at most max(4 × the defect's, 400 mm²)).
import { describe, expect, it } from "vitest";
import { score, type CaseRun } from "../../bench/press-sim-eval";
import type { Truth } from "../support/press-sim/case";

const truth = (over: Partial<Truth>): Truth => ({
  seed: 1, set: "training", template: "tea-carton", ups: { rows: 1, columns: 1, count: 1 }, sheet_mm: { w: 100, h: 100 },
  trim_on_sheet_mm: { x: 10, y: 10, w: 80, h: 80 }, dpi: 300, print_dpi: 600, expect: "place", clean: false, partial: false,
  scan_file: "scan.png", format: "png", placement: { quarter: 0, angleDeg: 0, glassWidthMm: 110, glassHeightMm: 110, centreXMm: 55, centreYMm: 55 },
  screens: [], dot_gain_50: 0.14, scanner: { samples: 3, blurSigmaPx: 1, falloff: { ax: 0, ay: 0, q: 0 }, cast: [1, 1, 1], gamma: [1, 1, 1], noise: 0, lid: [0.8, 0.8, 0.8] },
  defects: [], ignored: [], ...over,
});
const box = (x: number, y: number, w: number, h: number, kind = "extra_ink") => ({ x_mm: x, y_mm: y, w_mm: w, h_mm: h, area_mm2: w * h, kind });
const run = (t: Truth, findings: ReturnType<typeof box>[], exitCode = findings.length ? 1 : 0): CaseRun => ({ truth: t, exitCode, findings, wallS: 1, peakRssMiB: 100 });
const dot = { kind: "extra_ink" as const, cause: "felt-tip dot", box_mm: { x: 20, y: 20, w: 1, h: 1 }, area_mm2: 0.785, size_mm: 1 };

describe("press-sim evaluator", () => {
  it("counts loose and tight finds, false regions, refusals and kinds", () => {
    const s = score([
      run(truth({ defects: [dot] }), [box(21.5, 20, 3, 3)]), // touches within 1 mm, 9 mm² ≤ 400: tight, kind right
      run(truth({ defects: [dot] }), [box(0, 0, 30, 30, "colour_shift")]), // touches, 900 mm² > 400: loose only
      run(truth({ defects: [dot] }), [box(40, 40, 2, 2)]), // misses and is false
      run(truth({ clean: true }), [box(5, 5, 1, 1), box(50, 50, 1, 1)]), // two false on a clean sheet
      run(truth({ clean: true }), [], 2), // a false refusal
      run(truth({ expect: "refuse", refuse_reason: "blank_sheet", clean: true }), [], 2),
    ]);
    expect(s.defects).toBe(3);
    expect(s.recallLoose).toBeCloseTo(2 / 3);
    expect(s.recallTight).toBeCloseTo(1 / 3);
    expect(s.defects05at300).toBe(3);
    expect(s.kindRight).toBe(1);
    expect(s.kindJudged).toBe(2);
    expect(s.cleanPlaced).toBe(1);
    expect(s.falsePerClean).toBe(2);
    expect(s.falseOnDefective).toBe(1);
    expect(s.falseRefusals).toBe(1);
    expect(s.shouldPlace).toBe(5);
    expect(s.correctRefusals).toBe(1);
    expect(s.shouldRefuse).toBe(1);
  });

  it("does not count a find of a defect only partly on a partial scan as false", () => {
    const s = score([run(truth({ partial: true, ignored: [dot] }), [box(20, 20, 1, 1)])]);
    expect(s.falseOnDefective + (Number.isNaN(s.falsePerClean) ? 0 : s.falsePerClean)).toBe(0);
  });
});
