// The scanner's blur measured per sheet. The kernel's variance is σ² by construction ([a, 1 − 2a, a] with
// a = σ²/2 has variance 2a); a scan made by blurring the artwork with a known σ must be measured back.
import { beforeAll, describe, expect, it } from "vitest";
import { identityModel } from "@/lib/imaging/colour/colour-model";
import { estimateOpticalBlur, OPTICAL_BLUR_STEPS_PX, opticalBlur, opticalKernel } from "@/lib/imaging/colour/optics";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import type { ArtworkRaster } from "@/lib/imaging/types";
import { makeCartonPdf } from "@/tests/support/carton";

let artwork: ArtworkRaster;

beforeAll(async () => {
  const { pdf } = await makeCartonPdf({ widthMm: 150, heightMm: 110, rows: 1, columns: 2 });
  artwork = await rasterisePage(pdf, { dpi: 200 });
});

describe("scanner blur", () => {
  it.each([0.2, 0.5, 0.9, 1.4])("has a kernel of unit sum and variance σ² for σ = %s px", (sigma) => {
    const k = opticalKernel(sigma);
    const r = (k.length - 1) / 2;
    const sum = k.reduce((a, b) => a + b, 0);
    const variance = k.reduce((a, v, i) => a + v * (i - r) ** 2, 0);
    expect(sum).toBeCloseTo(1, 12);
    expect(variance).toBeCloseTo(sigma * sigma, sigma > 0.6 ? 2 : 12);
  });

  it.each([0, 0.4, 0.75, 1.1])("measures back a blur of σ = %s px put on the artwork", async (sigma) => {
    const data = sigma > 0 ? opticalBlur(new Uint8Array(artwork.data), artwork.width, artwork.height, sigma) : new Uint8Array(artwork.data);
    const scan = { width: artwork.width, height: artwork.height, data };
    const found = await estimateOpticalBlur(artwork, scan, { artworkToScan: [1, 0, 0, 0, 1, 0] }, identityModel(), 1.2, {
      x: 0,
      y: 0,
      w: artwork.width,
      h: artwork.height,
    });
    expect(OPTICAL_BLUR_STEPS_PX).toContain(found);
    expect(Math.abs(found - sigma)).toBeLessThanOrEqual(0.11);
  });
});
