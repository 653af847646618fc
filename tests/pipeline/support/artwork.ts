// The invented carton artwork and simulated scans of it, shared by the pipeline tests and the demo run.
import sharp from "sharp";
import { makeCartonPdf } from "@/tests/support/carton";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";

export async function cartonArtwork(opts: Parameters<typeof makeCartonPdf>[0] = {}) {
  return makeCartonPdf({ widthMm: 210, heightMm: 148, rows: 1, columns: 2, ...opts });
}

/** A "scan" that is the artwork's own raster as PNG: a perfect sheet, for plumbing tests. */
export async function perfectScanPng(pdf: Uint8Array, dpi: number): Promise<Buffer> {
  const page = await rasterisePage(pdf, { dpi });
  return sharp(page.data, { raw: { width: page.width, height: page.height, channels: 4 } })
    .withMetadata({ density: dpi })
    .png()
    .toBuffer();
}
