// The scanner's own blur, measured on each sheet. A flatbed's optics blend light over a fraction of a
// millimetre, and models differ; the sharp artwork raster must be blurred alike before the two are compared,
// or every edge of fine type differs by a few ΔE00 and the edge allowance has to swallow it. The blur is
// found by trying a few Gaussian widths (in linear light, as optics blend) on windows of the artwork that hold
// edges, and keeping the one whose low-passed result lies nearest the normalised scan.
import { applyColourModel, type ColourModel } from "./colour-model";
import { lowPass, opticalBlur } from "./normalise";
import { warpScanToArtwork } from "./align-warp";
import { intersect, type PxRect } from "./raster";
import type { Alignment, RgbaImage } from "./types";

/**
 * Widths tried (σ, px of the artwork grid). Few on purpose: the prepared artwork is kept once per width in use
 * (prepared.ts), and a press run from one scanner keeps to one of them.
 */
export const OPTICAL_BLUR_STEPS_PX = [0, 0.45, 0.6, 0.75, 0.9, 1.1, 1.35, 1.6];
const WINDOW = 32;
const GRID = 8;
const WINDOWS = 24;

/** σ (px) of the scanner's blur, one of OPTICAL_BLUR_STEPS_PX; 0 when too few windows hold an edge. */
export async function estimateOpticalBlur(
  artwork: RgbaImage,
  scan: RgbaImage,
  alignment: Pick<Alignment, "artworkToScan" | "localField">,
  model: ColourModel,
  sigmaPx: number,
  inspectPx: PxRect,
): Promise<number> {
  const margin = Math.ceil(3 * (sigmaPx + OPTICAL_BLUR_STEPS_PX.at(-1)!));
  const side = WINDOW + 2 * margin;
  const sites = edgeSites(artwork, inspectPx, margin);
  if (sites.length < 4) return 0;
  // All windows side by side in one mosaic, so each trial is one blur call; blur crossing from one window into
  // the next reaches only the margins, and only window cores are scored.
  const mosaicW = side * sites.length, n = mosaicW * side;
  const art = new Uint8Array(n * 4), scanned = new Uint8Array(n * 4);
  const usable: boolean[] = [];
  sites.forEach((s, k) => {
    const rect = { x: s.x - margin, y: s.y - margin, w: side, h: side };
    const { image, mask } = warpScanToArtwork(scan, alignment, artwork, rect);
    usable.push(mask.every((m) => m === 1));
    for (let row = 0; row < side; row++) {
      const from = ((rect.y + row) * artwork.width + rect.x) * 4;
      art.set(artwork.data.subarray(from, from + side * 4), (row * mosaicW + k * side) * 4);
      scanned.set(image.data.subarray(row * side * 4, (row + 1) * side * 4), (row * mosaicW + k * side) * 4);
    }
  });
  const scanLow = await lowPass(scanned, mosaicW, side, sigmaPx);
  applyColourModel(model, scanLow);
  let best = 0, bestError = Infinity;
  for (const step of OPTICAL_BLUR_STEPS_PX) {
    const blurred = step > 0 ? await opticalBlur(art, mosaicW, side, step) : art;
    const artLow = await lowPass(blurred, mosaicW, side, sigmaPx);
    let error = 0;
    for (let k = 0; k < sites.length; k++) {
      if (!usable[k]) continue;
      for (let row = margin; row < margin + WINDOW; row++) {
        for (let col = margin, p = (row * mosaicW + k * side + margin) * 4; col < margin + WINDOW; col++, p += 4) {
          error += (artLow[p] - scanLow[p]) ** 2 + (artLow[p + 1] - scanLow[p + 1]) ** 2 + (artLow[p + 2] - scanLow[p + 2]) ** 2;
        }
      }
    }
    if (error < bestError) { bestError = error; best = step; }
  }
  return best;
}

/** Window corners (core top-left) with the most edge on a GRID × GRID raster over the inspected area. */
function edgeSites(art: RgbaImage, area: PxRect, margin: number): { x: number; y: number }[] {
  const inner = intersect({ x: area.x + margin, y: area.y + margin, w: area.w - 2 * margin - WINDOW, h: area.h - 2 * margin - WINDOW }, area);
  if (inner.w <= 0 || inner.h <= 0) return [];
  const scored: { x: number; y: number; score: number }[] = [];
  const d = art.data, w = art.width;
  for (let gy = 0; gy < GRID; gy++) {
    for (let gx = 0; gx < GRID; gx++) {
      const x = inner.x + Math.floor(((gx + 0.5) * inner.w) / GRID), y = inner.y + Math.floor(((gy + 0.5) * inner.h) / GRID);
      let score = 0;
      for (let row = y; row < y + WINDOW; row++) {
        for (let col = x, p = (row * w + x) * 4; col < x + WINDOW - 1; col++, p += 4) score += Math.abs(d[p + 1] - d[p + 5]) + Math.abs(d[p + 1] - d[p + 1 + w * 4]);
      }
      scored.push({ x, y, score });
    }
  }
  return scored.filter((s) => s.score > 0).sort((a, b) => b.score - a.score).slice(0, WINDOWS);
}
