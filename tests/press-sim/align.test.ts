// Placement of press-sim sheets (printed by Ghostscript, scanned by press-sim's own scanner) that the aligner
// once refused as scan_mismatch: the affine ECC on the coarse level ran to 0.87 × 0.98 in scale. The truth
// of each case says how the sheet lay on the glass (a quarter turn plus a small angle); the engine's
// requirement is ≤ 0.05° of rotation and ≤ 0.05 % of scale. Training seeds only. Needs Ghostscript.
import { describe, expect, it } from "vitest";
import { alignScan } from "@/lib/imaging/align/align";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import { loadScan } from "@/lib/imaging/scan/load-scan";
import { makeCase } from "../support/press-sim/case";

/** Signed difference of two angles in degrees, in (−180, 180]. */
const angleGap = (a: number, b: number) => ((((a - b) % 360) + 540) % 360) - 180;

describe("alignScan on press-sim sheets", () => {
  // Seed 8: a 1-up juice label at 200 dpi in a Display P3 TIFF, turned 270° − 1.47°; seed 61: a partial scan of
  // a 2-up juice label at 300 dpi in JPEG 4:2:0, turned 270° − 1.41°.
  it.each([8, 61])("places training seed %i where it lay on the glass", async (seed) => {
    const c = await makeCase(seed);
    const artwork = await rasterisePage(c.artworkPdf, { dpi: c.truth.dpi });
    const scan = await loadScan(new Uint8Array(c.scan), { dpi: c.truth.dpi });
    const { alignment } = await alignScan(artwork, scan);
    const laid = c.truth.placement.quarter * 90 + c.truth.placement.angleDeg;
    expect(Math.abs(angleGap(alignment.rotationDeg, laid))).toBeLessThan(0.05);
    expect(Math.abs(alignment.scale - 1)).toBeLessThan(0.0005);
  }, 120_000);
});
