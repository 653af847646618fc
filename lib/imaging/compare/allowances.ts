// ALLOWANCES measured on each sheet, on a sample of its bands, before the comparison.
//
// Edges. A printed and scanned sheet never matches a PDF renderer's raster exactly along the artwork's edges:
// the press's RIP places and anti-aliases edges its own way, ink spreads (type prints bolder), screens break
// edges into dots, the scanner's optics soften them. How much of an edge's contrast that leaves differs by
// press, stock and scanner (about 5–15 % on sheets rendered like the artwork, 20–50 % on sheets from another
// renderer), so one fixed allowance either floods a sheet with its own type or misses a changed word on
// another. The edge allowance is the level that all but a small share of the sheet's edge pixels need no more
// than. A defect covers a few of a sheet's edge pixels and a press's edges all of them, so a defect barely
// moves it; a missing or changed stroke differs by about the whole contrast and still stands out.
//
// Flat areas. A halftone tint scanned at 200–300 dpi beats against the scanner's grid (moiré), and board and
// ink mottle add blotches of ΔE00 3–5 that the low-pass does not remove; paper white and solids stay quieter.
// By tone, the flat allowance is how far the sheet's own noise reaches past the profile's level on all but a
// small share of flat pixels: a speck of ink or a colour patch well above the noise is still found, a
// difference no larger than this scan's noise on that tone is not claimed as a defect.
import { processRect, type SheetContext } from "./bands";
import { EDGE_ALLOWANCE, EDGE_SAMPLE_STEPS, FLAT_SAMPLE_RESOLUTION, FLAT_SAMPLE_STEPS, newSheetSample, TONE_BINS, type SheetSample } from "./compare";

/**
 * Share of a sheet's edge pixels, and of its flat pixels of one tone, left above their allowance. Edges: one
 * in ten thousand, since bold type may be a small part of a sheet's edges yet print bolder than the rest (on
 * 70 training sheets of the second simulator, 0.001 left 8.8 false regions a clean sheet, 0.0001 left 7.7 with
 * the same recall; a cap of 0.55 instead of 0.45 lost a changed word). Flat noise comes in blotches, and three
 * pixels together past the profile's level make a finding.
 */
const EDGE_SHARE_ABOVE = 0.0001;
const FLAT_SHARE_ABOVE = 0.0002;
/**
 * A defect can hold more than that share of a tone's pixels (a 20 mm streak on a small label), so the flat
 * level is at most this many times the level 1 % of the tone's pixels reach: noise has a short tail past it,
 * a defect does not move it.
 */
const FLAT_TAIL_FACTOR = 1.6;
const FLAT_BULK_SHARE = 0.01;
/**
 * The most forgiven: on edges 0.45 of the contrast (a stroke that is missing or changed differs by 70–100 % of
 * it); on flat areas three times the profile's level. A dark solid's screen beating against the scanner's grid
 * reached ΔE00 8–15 in blotches of 5–7 mm on the second simulator (a coffee label's brown: 99 false regions
 * with the profile's level as the cap, 4 with three times it; over 70 training sheets 8.1 false regions a clean
 * sheet before, 6.9 with this and the smooth colours of colour-model.ts), while a void or a hickey on a solid
 * differs by the ink itself (ΔE00 20 and more).
 */
const MAX_EDGE_ALLOWANCE = 0.45;
const FLAT_CAP_SHARE = 3;
/** Fewer pixels than this in the sample (edges, or flat pixels of one tone) and nothing is forgiven beyond the default. */
const MIN_SAMPLE_PIXELS = 1500;
/** Share of the inspected rows sampled, in bands of SAMPLE_BAND_ROWS. */
const SAMPLE_SHARE = 0.25;
const SAMPLE_BAND_ROWS = 24;
const MAX_SAMPLE_BANDS = 48;

export interface SheetAllowances {
  edge: number;
  /** ΔE00 forgiven on flat areas, by tone bin (compare.ts TONE_BINS). */
  flat: Float32Array;
  edgePixels: number;
}

/** The sheet's allowances, from a sample of bands spread evenly over its inspected rows. */
export async function measureAllowances(ctx: SheetContext): Promise<SheetAllowances> {
  const { inspectPx, artwork } = ctx;
  const sample = newSheetSample();
  const rows = Math.min(SAMPLE_BAND_ROWS, inspectPx.h);
  const bands = Math.max(1, Math.min(MAX_SAMPLE_BANDS, Math.round((SAMPLE_SHARE * inspectPx.h) / rows)));
  const step = (inspectPx.h - rows) / Math.max(1, bands - 1);
  for (let b = 0; b < bands; b++) {
    const y = inspectPx.y + Math.round(b * step);
    await processRect(ctx, { x: 0, y, w: artwork.width, h: rows }, false, sample);
  }
  return { edge: edgeAllowanceFrom(sample), flat: flatAllowanceFrom(sample, ctx.peakDeltaE00), edgePixels: sample.edgePixels };
}

/** The level all but EDGE_SHARE_ABOVE of the sample's edge pixels need no more than, within its bounds. */
export function edgeAllowanceFrom(sample: SheetSample): number {
  const level = levelAbove(sample.edgeNeeded, 0, EDGE_SAMPLE_STEPS + 1, sample.edgePixels, EDGE_SHARE_ABOVE);
  return level === null ? EDGE_ALLOWANCE : Math.min(MAX_EDGE_ALLOWANCE, Math.max(EDGE_ALLOWANCE, level / EDGE_SAMPLE_STEPS));
}

/** By tone: how far the ΔE00 that all but FLAT_SHARE_ABOVE of the flat pixels stay under lies past `peak`. */
export function flatAllowanceFrom(sample: SheetSample, peak: number): Float32Array {
  const out = new Float32Array(TONE_BINS);
  for (let t = 0; t < TONE_BINS; t++) {
    const start = t * (FLAT_SAMPLE_STEPS + 1);
    const tail = levelAbove(sample.flatDeltaE, start, FLAT_SAMPLE_STEPS + 1, sample.flatPixels[t], FLAT_SHARE_ABOVE);
    const bulk = levelAbove(sample.flatDeltaE, start, FLAT_SAMPLE_STEPS + 1, sample.flatPixels[t], FLAT_BULK_SHARE);
    if (tail === null || bulk === null) continue;
    const level = Math.min(tail, FLAT_TAIL_FACTOR * bulk) / FLAT_SAMPLE_RESOLUTION;
    out[t] = Math.min(FLAT_CAP_SHARE * peak, Math.max(0, level - peak));
  }
  return out;
}

/**
 * The upper edge of the highest bin (of `bins` from `start`) such that more than `share` of `total` pixels lie
 * at or above it; null when the sample is too small to tell.
 */
function levelAbove(hist: Float64Array, start: number, bins: number, total: number, share: number): number | null {
  if (total < MIN_SAMPLE_PIXELS) return null;
  const limit = share * total;
  let above = 0;
  for (let bin = bins - 1; bin >= 0; bin--) {
    above += hist[start + bin];
    if (above > limit) return bin + 1;
  }
  return 0;
}
