// PNG crops around a finding for the reviewer: the artwork, the aligned scan (as scanned, not normalised) and a
// difference picture (artwork faded to grey, tolerant ΔE00 painted red from the pixel level up to twice the
// profile threshold), all over the same rectangle of the artwork page.
import { PNG } from "pngjs";
import { processRect, type SheetContext } from "../compare/bands";
import { cropRgba, intersect, mmToPx, rgbToRgba, type PxRect } from "../raster";
import type { Finding } from "../types";

/** Longest side of a crop in pixels; larger areas are cut around the finding's centre. */
const MAX_CROP_PX = 512;
const MARGIN_MM = 2;

export function cropRectFor(f: Finding, dpi: number, width: number, height: number): PxRect {
  const margin = Math.max(MARGIN_MM, 0.25 * Math.max(f.wMm, f.hMm));
  let x0 = mmToPx(f.xMm - margin, dpi), x1 = mmToPx(f.xMm + f.wMm + margin, dpi);
  let y0 = mmToPx(f.yMm - margin, dpi), y1 = mmToPx(f.yMm + f.hMm + margin, dpi);
  const cx = (x0 + x1) / 2, cy = (y0 + y1) / 2;
  if (x1 - x0 > MAX_CROP_PX) { x0 = cx - MAX_CROP_PX / 2; x1 = cx + MAX_CROP_PX / 2; }
  if (y1 - y0 > MAX_CROP_PX) { y0 = cy - MAX_CROP_PX / 2; y1 = cy + MAX_CROP_PX / 2; }
  const r = { x: Math.floor(x0), y: Math.floor(y0), w: Math.ceil(x1) - Math.floor(x0), h: Math.ceil(y1) - Math.floor(y0) };
  return intersect(r, { x: 0, y: 0, w: width, h: height });
}

export async function makeCrops(
  ctx: SheetContext,
  f: Finding,
  dpi: number,
  peakDeltaE00: number,
): Promise<NonNullable<Finding["crops"]>> {
  const art = ctx.artwork;
  const rect = cropRectFor(f, dpi, art.width, art.height);
  const artRgba = cropRgba(art.data, art.width, rect);
  // Copied out at once: the source reuses its buffers, and processRect below asks it again.
  const scanRgba = rgbToRgba(ctx.source(rect).rgb);
  const diff = await processRect(ctx, rect, true);
  const heat = new Uint8Array(rect.w * rect.h * 4);
  const low = ctx.lowDeltaE00, span = Math.max(1e-6, 2 * peakDeltaE00 - low);
  for (let i = 0, p = 0; i < rect.w * rect.h; i++, p += 4) {
    const grey = 0.299 * artRgba[p] + 0.587 * artRgba[p + 1] + 0.114 * artRgba[p + 2];
    const faded = 255 - (255 - grey) * 0.3;
    const e = diff.deltaE[i];
    const t = e < low ? 0 : Math.min(1, 0.35 + (0.65 * (e - low)) / span);
    heat[p] = faded + (255 - faded) * t;
    heat[p + 1] = faded * (1 - t);
    heat[p + 2] = faded * (1 - t);
    heat[p + 3] = 255;
  }
  return { artwork: encodePng(artRgba, rect), scan: encodePng(scanRgba, rect), difference: encodePng(heat, rect) };
}

function encodePng(rgba: Uint8Array, rect: PxRect): Buffer {
  const png = new PNG({ width: rect.w, height: rect.h });
  png.data = Buffer.from(rgba.buffer, rgba.byteOffset, rgba.length);
  return PNG.sync.write(png);
}
