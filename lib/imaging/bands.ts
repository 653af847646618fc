// One rectangle of the sheet through normalise and compare: fetch artwork and aligned scan with a halo wide
// enough for the low-pass and the registration radius, low-pass both, apply the colour model to the scan,
// then compare the core. Full-width bands of this keep memory bounded on a B1 sheet at 300 dpi.
import { warpScanToArtwork } from "./align";
import { compareBand, CompareScratch, type BandDifference } from "./compare";
import { applyColourModel, lowPass, type ColourModel } from "./normalise";
import { cropRgba, intersect, type PxRect } from "./raster";
import type { Alignment, RgbaImage } from "./types";

/** RGBA (alpha 255) of a rectangle of the scan seen in the artwork's pixel grid, and 1 where the scan covers it. */
export type AlignedScanSource = (rect: PxRect) => { rgba: Uint8Array; mask: Uint8Array };

/** The scan through its alignment, resampled one rectangle at a time: no full-size warped copy is held. */
export function alignedScanSource(scan: RgbaImage, alignment: Alignment, artwork: RgbaImage): AlignedScanSource {
  return (rect) => {
    const { image, mask } = warpScanToArtwork(scan, alignment, artwork, rect);
    return { rgba: image.data as Uint8Array, mask };
  };
}

export interface SheetContext {
  artwork: RgbaImage;
  source: AlignedScanSource;
  model: ColourModel;
  sigmaPx: number;
  radiusPx: number;
  lowDeltaE00: number;
  peakDeltaE00: number;
  /** Inspected part of the page (covered by the scan), px. */
  inspectPx: PxRect;
  /** Excluded rectangles, px. */
  excludedPx: PxRect[];
  scratch: CompareScratch;
  timings: { normalise: number; compare: number };
}

export interface RectDifference extends BandDifference {
  rect: PxRect;
}

/** Pixels the low-pass reaches beyond a core rectangle, plus the registration radius. */
export function haloPx(ctx: SheetContext): number {
  return Math.ceil(3 * ctx.sigmaPx) + ctx.radiusPx + Math.ceil(2 * ctx.sigmaPx) + 1;
}

export async function processRect(ctx: SheetContext, core: PxRect, everyPixel = false): Promise<RectDifference> {
  const art = ctx.artwork;
  const halo = haloPx(ctx);
  const started = performance.now();
  const ext = intersect(
    { x: core.x - halo, y: core.y - halo, w: core.w + 2 * halo, h: core.h + 2 * halo },
    { x: 0, y: 0, w: art.width, h: art.height },
  );
  // Columns outside the core are only needed for the low-pass; bands span the width so ext.x === core.x there.
  const artPatch = ext.x === 0 && ext.w === art.width
    ? new Uint8Array(art.data.buffer, art.data.byteOffset + ext.y * art.width * 4, ext.w * ext.h * 4)
    : cropRgba(art.data, art.width, ext);
  const scanPatch = ctx.source(ext);
  const [artLow, scanLow] = await Promise.all([
    lowPass(artPatch, ext.w, ext.h, ctx.sigmaPx),
    lowPass(scanPatch.rgba, ext.w, ext.h, ctx.sigmaPx),
  ]);
  applyColourModel(ctx.model, scanLow);
  const inspect = inspectMask(ctx, core, ext, scanPatch.mask, Math.ceil(2 * ctx.sigmaPx) + 1);
  const mid = performance.now();
  ctx.timings.normalise += mid - started;

  // compareBand works on full rows of the patch: crop the core columns out afterwards when the rect is narrow.
  const coreY = core.y - ext.y;
  const wideInspect = new Uint8Array(ext.w * core.h);
  for (let row = 0; row < core.h; row++) wideInspect.set(inspect.subarray(row * core.w, (row + 1) * core.w), row * ext.w + (core.x - ext.x));
  const diff = compareBand(
    { width: ext.w, rows: ext.h, art: artLow, scan: scanLow, coreY, coreRows: core.h, inspect: wideInspect },
    { lowDeltaE00: ctx.lowDeltaE00, peakDeltaE00: ctx.peakDeltaE00, radiusPx: ctx.radiusPx, blurReachPx: Math.ceil(2 * ctx.sigmaPx), everyPixel },
    ctx.scratch,
  );
  ctx.timings.compare += performance.now() - mid;
  if (ext.w === core.w) return { ...diff, rect: core };
  const deltaE = new Float32Array(core.w * core.h);
  const kind = new Uint8Array(core.w * core.h);
  const score = new Float32Array(core.w * core.h);
  for (let row = 0; row < core.h; row++) {
    const from = row * ext.w + (core.x - ext.x);
    deltaE.set(diff.deltaE.subarray(from, from + core.w), row * core.w);
    kind.set(diff.kind.subarray(from, from + core.w), row * core.w);
    score.set(diff.score.subarray(from, from + core.w), row * core.w);
  }
  return { ...diff, deltaE, kind, score, rect: core };
}

/**
 * 1 where a core pixel is inspected: inside the inspected area, outside every excluded rectangle, and covered
 * by the scan with a margin (`erode` px) so that the low-pass never mixes in the empty area beyond the scan.
 */
function inspectMask(ctx: SheetContext, core: PxRect, ext: PxRect, mask: Uint8Array, erode: number): Uint8Array {
  const out = new Uint8Array(core.w * core.h);
  const area = intersect(core, ctx.inspectPx);
  const covered = (x: number, y: number) => {
    if (x < ext.x || y < ext.y || x >= ext.x + ext.w || y >= ext.y + ext.h) return true;
    return mask[(y - ext.y) * ext.w + (x - ext.x)] === 1;
  };
  for (let y = area.y; y < area.y + area.h; y++) {
    for (let x = area.x; x < area.x + area.w; x++) {
      if (mask[(y - ext.y) * ext.w + (x - ext.x)] !== 1) continue;
      if (!covered(x - erode, y) || !covered(x + erode, y) || !covered(x, y - erode) || !covered(x, y + erode)) continue;
      out[(y - core.y) * core.w + (x - core.x)] = 1;
    }
  }
  for (const e of ctx.excludedPx) {
    const r = intersect(e, core);
    for (let y = r.y; y < r.y + r.h; y++) out.fill(0, (y - core.y) * core.w + (r.x - core.x), (y - core.y) * core.w + (r.x - core.x) + r.w);
  }
  return out;
}
