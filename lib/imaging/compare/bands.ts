// One rectangle of the sheet through normalise and compare: fetch artwork and aligned scan with a halo wide
// enough for the low-pass and the registration radius, low-pass both, apply the colour model to the scan,
// then compare the core. Full-width bands of this keep memory bounded on a B1 sheet at 300 dpi.
import { warpScanToArtwork } from "../align/align";
import { WarpBuffers } from "../align/warp";
import { compareBand, CompareScratch, type BandDifference, type SheetSample } from "./compare";
import { lowPassRgb, mapColours, type ColourModel } from "../colour/normalise";
import { preparedRect, type ContrastWindows } from "./prepared";
import { removeLightField, type LightField } from "../colour/light-field";
import { intersect, type PxRect } from "../raster";
import type { Alignment, RgbaImage } from "../types";

/** RGB (3 bytes a pixel) of a rectangle of the scan seen in the artwork's pixel grid, and 1 where the scan covers it. */
export type AlignedScanSource = (rect: PxRect) => { rgb: Uint8Array; mask: Uint8Array };

/**
 * The scan through its alignment, resampled one rectangle at a time: no full-size warped copy is held. Each
 * rectangle overwrites the previous one's buffers, so a caller uses a result before asking for the next.
 */
export function alignedScanSource(scan: RgbaImage, alignment: Alignment, artwork: RgbaImage, buffers: WarpBuffers): AlignedScanSource {
  return (rect) => {
    const { image, mask } = warpScanToArtwork(scan, alignment, artwork, rect, buffers, 3);
    return { rgb: image.data as Uint8Array, mask };
  };
}

/** The reusable buffers of one sheet's bands. */
export interface SheetScratch {
  warp: WarpBuffers;
  compare: CompareScratch;
}

/**
 * Buffers kept per thread between sheets and lent to one inspection at a time (inspections in one thread may
 * interleave at their awaits): fresh ones for every sheet cost page faults and garbage collections.
 */
const idleScratch: SheetScratch[] = [];

export function borrowScratch(): SheetScratch {
  return idleScratch.pop() ?? { warp: new WarpBuffers(), compare: new CompareScratch() };
}

export function returnScratch(scratch: SheetScratch): void {
  if (idleScratch.length < 2) idleScratch.push(scratch);
}

export interface SheetContext {
  artwork: RgbaImage;
  source: AlignedScanSource;
  model: ColourModel;
  /** The scanner's light across the page, divided out after the colour model. */
  light: LightField | null;
  sigmaPx: number;
  radiusPx: number;
  /** Windows of the artwork's local contrast (prepared.ts). */
  windows: ContrastWindows;
  lowDeltaE00: number;
  peakDeltaE00: number;
  /** The sheet's edge and flat-area allowances (allowances.ts); compare.ts's defaults when absent. */
  edgeAllowance?: number;
  flatAllowance?: Float32Array;
  /** Inspected part of the page (covered by the scan), px. */
  inspectPx: PxRect;
  /** Excluded rectangles, px. */
  excludedPx: PxRect[];
  scratch: CompareScratch;
  timings: { normalise: number; compare: number };
  /** Time by per-pixel pass (ms), added to band by band. */
  passes: Record<"warp" | "lowPass" | "colourMap" | "screen" | "cielab", number>;
}

export interface RectDifference extends BandDifference {
  rect: PxRect;
}

/** Pixels the low-pass reaches beyond a core rectangle, plus the registration radius. */
export function haloPx(ctx: SheetContext): number {
  return Math.ceil(3 * ctx.sigmaPx) + ctx.radiusPx + Math.ceil(2 * ctx.sigmaPx) + 1;
}

export async function processRect(ctx: SheetContext, core: PxRect, everyPixel = false, sample?: SheetSample): Promise<RectDifference> {
  const art = ctx.artwork;
  const halo = haloPx(ctx);
  const started = performance.now();
  const ext = intersect(
    { x: core.x - halo, y: core.y - halo, w: core.w + 2 * halo, h: core.h + 2 * halo },
    { x: 0, y: 0, w: art.width, h: art.height },
  );
  const scanPatch = ctx.source(ext);
  const warped = performance.now();
  ctx.passes.warp += warped - started;
  const [artPrepared, scanLow] = await Promise.all([
    preparedRect(art, ext, ctx.windows),
    lowPassRgb(scanPatch.rgb, ext.w, ext.h, ctx.sigmaPx),
  ]);
  const lowPassed = performance.now();
  ctx.passes.lowPass += lowPassed - warped;
  const scanNormal = ctx.scratch.normalisedScan(ext.w * ext.h * 4);
  mapColours(ctx.model, scanLow, 3, scanNormal);
  if (ctx.light) removeLightField(ctx.light, scanNormal, ext.w, ext.h, ext.x, ext.y);
  ctx.passes.colourMap += performance.now() - lowPassed;
  const inspect = inspectMask(ctx, core, ext, scanPatch.mask, Math.ceil(2 * ctx.sigmaPx) + 1);
  const mid = performance.now();
  ctx.timings.normalise += mid - started;

  // compareBand works on full rows of the patch: crop the core columns out afterwards when the rect is narrow.
  const coreY = core.y - ext.y;
  let wideInspect = inspect;
  if (ext.w !== core.w) {
    wideInspect = new Uint8Array(ext.w * core.h);
    for (let row = 0; row < core.h; row++) wideInspect.set(inspect.subarray(row * core.w, (row + 1) * core.w), row * ext.w + (core.x - ext.x));
  }
  const diff = compareBand(
    { width: ext.w, rows: ext.h, art: artPrepared, scan: scanNormal, coreY, coreRows: core.h, inspect: wideInspect },
    { lowDeltaE00: ctx.lowDeltaE00, peakDeltaE00: ctx.peakDeltaE00, radiusPx: ctx.radiusPx, everyPixel, edgeAllowance: ctx.edgeAllowance, flatAllowance: ctx.flatAllowance, sample },
    ctx.scratch,
  );
  const compared = performance.now() - mid;
  ctx.timings.compare += compared;
  ctx.passes.screen += diff.screenMs;
  ctx.passes.cielab += compared - diff.screenMs;
  if (ext.w === core.w) return { ...diff, rect: core };
  const deltaE = new Float32Array(core.w * core.h);
  const kind = new Uint8Array(core.w * core.h);
  const score = new Float32Array(core.w * core.h);
  const structural = new Uint8Array(core.w * core.h);
  const shift = new Int8Array(core.w * core.h * 3);
  for (let row = 0; row < core.h; row++) {
    const from = row * ext.w + (core.x - ext.x);
    deltaE.set(diff.deltaE.subarray(from, from + core.w), row * core.w);
    kind.set(diff.kind.subarray(from, from + core.w), row * core.w);
    score.set(diff.score.subarray(from, from + core.w), row * core.w);
    structural.set(diff.structural.subarray(from, from + core.w), row * core.w);
    shift.set(diff.shift.subarray(from * 3, (from + core.w) * 3), row * core.w * 3);
  }
  return { ...diff, deltaE, kind, score, structural, shift, rect: core };
}

/**
 * 1 where a core pixel is inspected: inside the inspected area, outside every excluded rectangle, and covered
 * by the scan with a margin (`erode` px) so that the low-pass never mixes in the empty area beyond the scan.
 */
function inspectMask(ctx: SheetContext, core: PxRect, ext: PxRect, mask: Uint8Array, erode: number): Uint8Array {
  const out = ctx.scratch.inspectMask(core.w * core.h);
  const area = intersect(core, ctx.inspectPx);
  // The covered part of a row is one run (the scan's footprint is a convex quadrilateral): keep its ends.
  const lo = new Int32Array(ext.h).fill(ext.w), hi = new Int32Array(ext.h).fill(-1);
  for (let row = 0; row < ext.h; row++) {
    const o = row * ext.w;
    let x = 0;
    while (x < ext.w && mask[o + x] !== 1) x++;
    if (x === ext.w) continue;
    let y = ext.w - 1;
    while (mask[o + y] !== 1) y--;
    lo[row] = x;
    hi[row] = y;
  }
  // Rows beyond the patch lie beyond the page: nothing there to mix in.
  const atEdgeTop = ext.y === 0, atEdgeBottom = ext.y + ext.h >= ctx.artwork.height;
  const span = (row: number): [number, number] => {
    if (row < 0) return atEdgeTop ? [lo[0], hi[0]] : [ext.w, -1];
    if (row >= ext.h) return atEdgeBottom ? [lo[ext.h - 1], hi[ext.h - 1]] : [ext.w, -1];
    return [lo[row], hi[row]];
  };
  const leftEdge = ext.x === 0 ? 0 : erode, rightEdge = ext.x + ext.w >= ctx.artwork.width ? 0 : erode;
  for (let y = area.y; y < area.y + area.h; y++) {
    const row = y - ext.y;
    const [l0, h0] = span(row), [l1, h1] = span(row - erode), [l2, h2] = span(row + erode);
    let from = Math.max(l0 + (l0 === 0 ? leftEdge : erode), l1, l2) + ext.x;
    let to = Math.min(h0 - (h0 === ext.w - 1 ? rightEdge : erode), h1, h2) + ext.x;
    from = Math.max(from, area.x);
    to = Math.min(to, area.x + area.w - 1);
    if (to >= from) out.fill(1, (y - core.y) * core.w + (from - core.x), (y - core.y) * core.w + (to - core.x) + 1);
  }
  for (const e of ctx.excludedPx) {
    const r = intersect(e, core);
    for (let y = r.y; y < r.y + r.h; y++) out.fill(0, (y - core.y) * core.w + (r.x - core.x), (y - core.y) * core.w + (r.x - core.x) + r.w);
  }
  return out;
}
