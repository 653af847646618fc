// The scan's resolution estimated from its size against the page's (lib/imaging/scan/scan-dpi.ts). Page sizes: ISO 216
// (A4 210 × 297 mm, B2 500 × 707 mm, B1 707 × 1000 mm); the resolutions are those flatbed scanners offer (common
// practice, no published source).
import { describe, expect, it } from "vitest";
import { estimateScanDpi, measuredDpi } from "@/lib/imaging/scan/scan-dpi";

const px = (mm: number, dpi: number) => Math.round((mm * dpi) / 25.4);

describe("estimateScanDpi", () => {
  it("finds the resolution of a whole sheet on the glass with a margin, either way round", () => {
    expect(estimateScanDpi({ width: px(210 + 12, 300), height: px(297 + 10, 300) }, { widthMm: 210, heightMm: 297 })).toBe(300);
    expect(estimateScanDpi({ width: px(297 + 10, 300), height: px(210 + 12, 300) }, { widthMm: 210, heightMm: 297 })).toBe(300);
    expect(estimateScanDpi({ width: px(707, 100), height: px(500, 100) }, { widthMm: 707, heightMm: 500 })).toBe(100);
    expect(estimateScanDpi({ width: px(1010, 200), height: px(715, 200) }, { widthMm: 1000, heightMm: 707 })).toBe(200);
  });

  it("keeps an odd resolution it cannot snap, and the alignment's scale measures the rest", () => {
    expect(estimateScanDpi({ width: px(210, 360), height: px(297, 360) }, { widthMm: 210, heightMm: 297 })).toBe(360);
    expect(measuredDpi(300, 1.0012)).toBe(300.4);
  });
});
