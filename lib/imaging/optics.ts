// The scanner's own blur, measured on each sheet. A flatbed's optics blend light over a fraction of a
// millimetre, and models differ; the sharp artwork raster must be blurred alike before the two are compared,
// or every edge of fine type differs by a few ΔE00 and the edge allowance has to swallow it. The blur is
// found by trying a few Gaussian widths (in linear light, as optics blend) on windows of the artwork that hold
// edges, and keeping the one whose low-passed result lies nearest the normalised scan.
import { warpScanToArtwork } from "./align-warp";
import { linearToSrgb255Fast, SRGB8_TO_LINEAR } from "./colour";
import { applyColourModel, type ColourModel } from "./colour-model";
import { intersect, type PxRect } from "./raster";
import type { Alignment, RgbaImage } from "./types";

/**
 * Widths tried (σ, px of the artwork grid). Few on purpose: the prepared artwork is kept once per width in use
 * (prepared.ts), and a press run from one scanner keeps to one of them.
 */
export const OPTICAL_BLUR_STEPS_PX = [0, 0.45, 0.6, 0.75, 0.9, 1.1, 1.35, 1.6];
const WINDOW = 32;
const GRID = 8;
const WINDOWS = 16;

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
  const scanLow = toRgba([0, 1, 2].map((c) => blurPlane(plane(scanned, n, c, (v) => v), mosaicW, side, sigmaPx, TRUNCATE_LOW_PASS)), n);
  applyColourModel(model, scanLow);
  // The artwork's trials in green alone: blur shows in every channel alike, and green carries most of the lightness.
  const artLinear = plane(art, n, 1, (v) => SRGB8_TO_LINEAR[v]);
  const score = (step: number) => {
    const seen = step > 0 ? blurPlane(artLinear, mosaicW, side, step, TRUNCATE_OPTICS) : artLinear;
    const artLow = blurPlane(seen.map(linearToSrgb255Fast), mosaicW, side, sigmaPx, TRUNCATE_LOW_PASS);
    let error = 0;
    for (let k = 0; k < sites.length; k++) {
      if (!usable[k]) continue;
      for (let row = margin; row < margin + WINDOW; row++) {
        for (let col = margin, i = row * mosaicW + k * side + margin; col < margin + WINDOW; col++, i++) error += (artLow[i] - scanLow[i * 4 + 1]) ** 2;
      }
    }
    return error;
  };
  // The misfit falls and then rises with the width tried: walk downhill from the width this artwork's last
  // sheet had (a run comes from one scanner), so a sheet usually costs three trials.
  const tried = new Map<number, number>();
  const misfit = (i: number) => {
    let e = tried.get(i);
    if (e === undefined) tried.set(i, (e = score(OPTICAL_BLUR_STEPS_PX[i])));
    return e;
  };
  let i = lastStep.get(artwork.data.buffer) ?? 0;
  for (;;) {
    if (i > 0 && misfit(i - 1) < misfit(i)) i--;
    else if (i < OPTICAL_BLUR_STEPS_PX.length - 1 && misfit(i + 1) < misfit(i)) i++;
    else break;
  }
  lastStep.set(artwork.data.buffer, i);
  return OPTICAL_BLUR_STEPS_PX[i];
}

/** Per thread: the step found on the last sheet of each artwork. */
const lastStep = new WeakMap<ArrayBufferLike, number>();

/** Kernels end where they fall under this share of their peak: as sharp's default for the low-pass. */
const TRUNCATE_LOW_PASS = 0.2;
const TRUNCATE_OPTICS = 0.05;

function plane(rgba: Uint8Array, n: number, c: number, f: (v: number) => number): Float32Array {
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) out[i] = f(rgba[i * 4 + c]);
  return out;
}

function toRgba(p: Float32Array[], n: number): Uint8Array {
  const out = new Uint8Array(n * 4);
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < 3; c++) out[i * 4 + c] = Math.min(255, Math.max(0, Math.round(p[c][i])));
    out[i * 4 + 3] = 255;
  }
  return out;
}

/** Separable Gaussian of σ on a float plane (edges held), the kernel cut where it falls under `truncate`. */
function blurPlane(src: Float32Array, w: number, h: number, sigma: number, truncate: number): Float32Array {
  const radius = Math.max(1, Math.floor(sigma * Math.sqrt(-2 * Math.log(truncate))));
  const kernel = Float64Array.from({ length: 2 * radius + 1 }, (_, k) => Math.exp(-((k - radius) ** 2) / (2 * sigma * sigma)));
  const sum = kernel.reduce((a, b) => a + b, 0);
  for (let k = 0; k < kernel.length; k++) kernel[k] /= sum;
  const tmp = new Float32Array(w * h), out = new Float32Array(w * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      let v = 0;
      for (let k = -radius; k <= radius; k++) v += kernel[k + radius] * src[y * w + Math.min(w - 1, Math.max(0, x + k))];
      tmp[y * w + x] = v;
    }
  }
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      let v = 0;
      for (let k = -radius; k <= radius; k++) v += kernel[k + radius] * tmp[Math.min(h - 1, Math.max(0, y + k)) * w + x];
      out[y * w + x] = v;
    }
  }
  return out;
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
