// EDGE ALLOWANCE per sheet. Along the artwork's edges a printed and scanned sheet never matches a PDF
// renderer's raster exactly: the press's RIP places and anti-aliases edges its own way, ink spreads (type
// prints bolder), screens break edges into dots, and the scanner's optics soften them. How much of an edge's
// contrast that leaves differs by press, stock and scanner (about 5–15 % on sheets rendered by the same
// renderer as the artwork, 20–50 % on sheets from another one), so one fixed allowance either floods a sheet
// with its own type or misses a changed word elsewhere. The allowance is therefore measured on the sheet: on
// a sample of bands, what each edge pixel would need forgiven not to be flagged; the allowance is the level
// that all but a small share of them stay under. A defect covers a few of a sheet's edge pixels, a press's
// edges all of them, so the defect barely moves it; a missing or changed stroke differs by about the whole
// contrast and still stands out.
import { processRect, type SheetContext } from "./bands";
import { EDGE_ALLOWANCE, EDGE_SAMPLE_STEPS, type EdgeSample } from "./compare";

/** Share of a sheet's edge pixels left above the allowance. */
const EDGE_SHARE_ABOVE = 0.001;
/** The most forgiven: a stroke that is missing or changed differs by 70–100 % of its contrast. */
const MAX_EDGE_ALLOWANCE = 0.45;
/** Fewer edge pixels than this in the sample and the default allowance is kept. */
const MIN_EDGE_PIXELS = 1500;
/** Share of the inspected rows sampled, in bands of SAMPLE_BAND_ROWS. */
const SAMPLE_SHARE = 0.25;
const SAMPLE_BAND_ROWS = 24;

export interface EdgeAllowance {
  allowance: number;
  edgePixels: number;
}

/** The sheet's edge allowance, from a sample of bands spread evenly over its inspected rows. */
export async function measureEdgeAllowance(ctx: SheetContext): Promise<EdgeAllowance> {
  const { inspectPx, artwork } = ctx;
  const sample: EdgeSample = { edgePixels: 0, needed: new Float64Array(EDGE_SAMPLE_STEPS + 1) };
  const rows = Math.min(SAMPLE_BAND_ROWS, inspectPx.h);
  const bands = Math.max(1, Math.min(32, Math.round((SAMPLE_SHARE * inspectPx.h) / rows)));
  const step = (inspectPx.h - rows) / Math.max(1, bands - 1);
  for (let b = 0; b < bands; b++) {
    const y = inspectPx.y + Math.round(b * step);
    await processRect(ctx, { x: 0, y, w: artwork.width, h: rows }, false, sample);
  }
  return { allowance: allowanceFrom(sample), edgePixels: sample.edgePixels };
}

/** The level all but EDGE_SHARE_ABOVE of the sample's edge pixels need no more than, within its bounds. */
export function allowanceFrom(sample: EdgeSample): number {
  if (sample.edgePixels < MIN_EDGE_PIXELS) return EDGE_ALLOWANCE;
  const limit = EDGE_SHARE_ABOVE * sample.edgePixels;
  let above = 0;
  for (let bin = sample.needed.length - 1; bin >= 0; bin--) {
    above += sample.needed[bin];
    if (above > limit) return Math.min(MAX_EDGE_ALLOWANCE, Math.max(EDGE_ALLOWANCE, (bin + 1) / EDGE_SAMPLE_STEPS));
  }
  return EDGE_ALLOWANCE;
}
