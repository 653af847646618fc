// The scanner's own blur, measured on each sheet. A flatbed's optics blend light over a fraction of a
// millimetre, and models differ; the sharp artwork raster must be blurred alike before the two are compared,
// or every edge of fine type differs by a few ΔE00 and the edge allowance has to swallow it. The blur is
// found by trying a few Gaussian widths (in linear light, as optics blend) on windows of the artwork that hold
// edges, and keeping the one whose low-passed result lies nearest the normalised scan.
import { warpScanToArtwork } from "../align/warp";
import { ArtworkCache } from "../compare/artwork-cache";
import { linearToSrgb255Fast, SRGB8_TO_LINEAR } from "./colour";
import { applyColourModel, type ColourModel } from "./colour-model";
import { intersect, type PxRect } from "../raster";
import type { Alignment, RgbaImage } from "../types";

/**
 * Widths tried (σ, px of the artwork grid), finer where small: on type at 300 dpi a step from none to 0.45 px
 * already decides between a clean sheet and a false finding. The prepared artwork is kept for two widths at a
 * time (prepared.ts); a press run from one scanner keeps to one or two neighbours.
 */
export const OPTICAL_BLUR_STEPS_PX = [0, 0.2, 0.3, 0.4, 0.5, 0.6, 0.75, 0.9, 1.1, 1.35, 1.6];
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
  const trials = artworkTrials(artwork, inspectPx, margin, sigmaPx);
  const { sites } = trials;
  if (sites.length < 4) return 0;
  // All windows side by side in one mosaic, so each trial blurs one image; blur crossing from one window into
  // the next reaches only the margins, and only window cores are scored.
  const mosaicW = side * sites.length, n = mosaicW * side;
  const scanned = new Uint8Array(n * 4);
  const usable: boolean[] = [];
  sites.forEach((s, k) => {
    const rect = { x: s.x - margin, y: s.y - margin, w: side, h: side };
    const { image, mask } = warpScanToArtwork(scan, alignment, artwork, rect);
    usable.push(mask.every((m) => m === 1));
    for (let row = 0; row < side; row++) scanned.set(image.data.subarray(row * side * 4, (row + 1) * side * 4), (row * mosaicW + k * side) * 4);
  });
  const scanLow = toRgba([0, 1, 2].map((c) => blurPlane(plane(scanned, n, c, (v) => v), mosaicW, side, sigmaPx, TRUNCATE_LOW_PASS)), n);
  applyColourModel(model, scanLow);
  const score = (step: number) => {
    let artLow = trials.low.get(step);
    if (!artLow) {
      const seen = opticalBlurPlane(trials.linear, mosaicW, side, step);
      trials.low.set(step, (artLow = blurPlane(seen.map(linearToSrgb255Fast), mosaicW, side, sigmaPx, TRUNCATE_LOW_PASS)));
    }
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
  const start = lastStep.get(artwork.data.buffer) ?? 0;
  let i = start;
  for (;;) {
    if (i > 0 && misfit(i - 1) < misfit(i)) i--;
    else if (i < OPTICAL_BLUR_STEPS_PX.length - 1 && misfit(i + 1) < misfit(i)) i++;
    else break;
  }
  // Keep the last sheet's width unless another fits clearly better: a change costs a new preparation.
  if (i !== start && misfit(i) > KEEP_LAST_WITHIN * misfit(start)) i = start;
  lastStep.set(artwork.data.buffer, i);
  return OPTICAL_BLUR_STEPS_PX[i];
}

const KEEP_LAST_WITHIN = 0.95;

/**
 * Start this artwork's blur search at `sigmaPx` (the width a stored preparation was made for) unless a sheet
 * of it was already measured in this thread: with the same keep-unless-clearly-better rule, the stored one is used.
 */
export function suggestBlurStep(artwork: RgbaImage, sigmaPx: number): void {
  const i = OPTICAL_BLUR_STEPS_PX.indexOf(sigmaPx);
  if (i >= 0 && !lastStep.has(artwork.data.buffer)) lastStep.set(artwork.data.buffer, i);
}

/** Per thread: the step found on the last sheet of each artwork. */
const lastStep = new WeakMap<ArrayBufferLike, number>();

interface ArtworkTrials {
  sites: { x: number; y: number }[];
  /** The artwork's windows in one mosaic, green channel in linear light. */
  linear: Float32Array;
  /** The mosaic as the scanner would see it at each width tried, low-passed (8-bit sRGB scale). */
  low: Map<number, Float32Array>;
}

/**
 * Per thread and artwork: the windows chosen over an inspected area and the artwork's side of each trial. They
 * depend on the artwork alone, so the sheets of a press run (one artwork, the same area) share them.
 */
const trialsByArtwork = new ArtworkCache<ArtworkTrials>(1);

function artworkTrials(artwork: RgbaImage, inspectPx: PxRect, margin: number, sigmaPx: number): ArtworkTrials {
  const key = [inspectPx.x, inspectPx.y, inspectPx.w, inspectPx.h, margin, sigmaPx].join();
  return trialsByArtwork.get(artwork, key, () => makeTrials(artwork, inspectPx, margin));
}

function makeTrials(artwork: RgbaImage, inspectPx: PxRect, margin: number): ArtworkTrials {
  const sites = edgeSites(artwork, inspectPx, margin);
  const side = WINDOW + 2 * margin, mosaicW = side * sites.length;
  // The trials run in green alone: blur shows in every channel alike, and green carries most of the lightness.
  const linear = new Float32Array(mosaicW * side);
  sites.forEach((s, k) => {
    for (let row = 0; row < side; row++) {
      const from = ((s.y - margin + row) * artwork.width + s.x - margin) * 4;
      for (let col = 0; col < side; col++) linear[row * mosaicW + k * side + col] = SRGB8_TO_LINEAR[artwork.data[from + col * 4 + 1]];
    }
  });
  return { sites, linear, low: new Map<number, Float32Array>() };
}

/** The low-pass kernel ends where it falls under this share of its peak, as sharp's default does. */
const TRUNCATE_LOW_PASS = 0.2;

/**
 * The optical blur's kernel along one axis, with a variance of exactly σ²: [a, 1 − 2a, a] with a = σ²/2 up to
 * σ = 0.6 px (a sampled Gaussian that small loses most of its variance), a sampled Gaussian over ±3σ above.
 */
export function opticalKernel(sigma: number): Float64Array {
  if (sigma <= 0) return Float64Array.of(1);
  if (sigma <= 0.6) return Float64Array.of(sigma * sigma / 2, 1 - sigma * sigma, sigma * sigma / 2);
  const radius = Math.ceil(3 * sigma);
  const k = Float64Array.from({ length: 2 * radius + 1 }, (_, i) => Math.exp(-((i - radius) ** 2) / (2 * sigma * sigma)));
  const sum = k.reduce((a, b) => a + b, 0);
  return k.map((v) => v / sum);
}

function opticalBlurPlane(linear: Float32Array, w: number, h: number, sigma: number): Float32Array {
  return sigma > 0 ? convolvePlane(linear, w, h, opticalKernel(sigma)) : linear;
}

/**
 * The artwork as the scanner sees it: blurred by σ px in linear light (as optics blend light), returned as
 * 8-bit sRGB RGBA with alpha 255. The same kernel as the estimate's, so the prepared artwork is what was measured.
 */
export function opticalBlur(rgba: Uint8Array, w: number, h: number, sigma: number): Uint8Array {
  const n = w * h;
  const out = new Uint8Array(n * 4);
  const linear = new Float32Array(n);
  for (let c = 0; c < 3; c++) {
    for (let i = 0; i < n; i++) linear[i] = SRGB8_TO_LINEAR[rgba[i * 4 + c]];
    const blurred = opticalBlurPlane(linear, w, h, sigma);
    for (let i = 0; i < n; i++) out[i * 4 + c] = linearToSrgb255Fast(blurred[i]) + 0.5;
  }
  for (let i = 0; i < n; i++) out[i * 4 + 3] = 255;
  return out;
}

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
  return convolvePlane(src, w, h, kernel.map((v) => v / sum));
}

/** A symmetric kernel along rows, then along columns (edges held). */
function convolvePlane(src: Float32Array, w: number, h: number, kernel: Float64Array): Float32Array {
  const radius = (kernel.length - 1) / 2;
  if (radius === 1) return convolve3(src, w, h, kernel[0], kernel[1]);
  const tmp = new Float32Array(w * h), out = new Float32Array(w * h);
  for (let y = 0; y < h; y++) {
    const row = y * w;
    for (let x = 0; x < w; x++) {
      let v = 0;
      if (x >= radius && x < w - radius) for (let k = 0; k < kernel.length; k++) v += kernel[k] * src[row + x - radius + k];
      else for (let k = 0; k < kernel.length; k++) v += kernel[k] * src[row + Math.min(w - 1, Math.max(0, x - radius + k))];
      tmp[row + x] = v;
    }
  }
  for (let y = 0; y < h; y++) {
    const inside = y >= radius && y < h - radius;
    for (let x = 0; x < w; x++) {
      let v = 0;
      if (inside) for (let k = 0; k < kernel.length; k++) v += kernel[k] * tmp[(y - radius + k) * w + x];
      else for (let k = 0; k < kernel.length; k++) v += kernel[k] * tmp[Math.min(h - 1, Math.max(0, y - radius + k)) * w + x];
      out[y * w + x] = v;
    }
  }
  return out;
}

/** convolvePlane for a three-tap kernel [side, middle, side], the common case, unrolled. */
function convolve3(src: Float32Array, w: number, h: number, side: number, middle: number): Float32Array {
  const tmp = new Float32Array(w * h), out = new Float32Array(w * h);
  for (let y = 0; y < h; y++) {
    const o = y * w;
    tmp[o] = middle * src[o] + side * (src[o] + src[o + 1]);
    for (let i = o + 1; i < o + w - 1; i++) tmp[i] = middle * src[i] + side * (src[i - 1] + src[i + 1]);
    tmp[o + w - 1] = middle * src[o + w - 1] + side * (src[o + w - 2] + src[o + w - 1]);
  }
  for (let y = 0; y < h; y++) {
    const up = Math.max(0, y - 1) * w, down = Math.min(h - 1, y + 1) * w, o = y * w;
    for (let x = 0; x < w; x++) out[o + x] = middle * tmp[o + x] + side * (tmp[up + x] + tmp[down + x]);
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
