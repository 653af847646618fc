// The artwork side of the comparison, prepared once per artwork and reused for every sheet of the run: its
// low-pass, its CIELAB and the local contrast that sizes the edge allowance. None of it depends on the scan,
// and a press run compares hundreds of sheets with one artwork, so a sheet pays only for its own side.
//
// Prepared data is kept per thread for artworks up to CACHE_MAX_PIXELS (about 19 bytes a pixel); larger pages
// (a B1 sheet at 300 dpi is ~98 megapixels) are prepared band by band for each sheet instead, so memory stays
// bounded. Never shared between threads.
import { rgbaToLab } from "./colour";
import { lowPass, opticalBlur } from "./normalise";
import { cropRgba, type PxRect } from "./raster";
import type { RgbaImage } from "./types";

/**
 * How the artwork is prepared: the scanner's blur (optics.ts) and the low-pass, then the windows of the local
 * contrast — the registration radius, and the radius plus the low-pass's reach.
 */
export interface ContrastWindows {
  opticalBlurPx: number;
  sigmaPx: number;
  radiusPx: number;
  reachPx: number;
}

/** The prepared artwork over one rectangle (rows of `rect.w` pixels). */
export interface PreparedRect {
  rect: PxRect;
  /** Low-passed artwork, RGBA 8-bit. */
  low: Uint8Array;
  /** CIELAB (D65) of `low`, 3 floats a pixel. */
  lab: Float32Array;
  /** ΔE*ab extent of `lab` within the registration radius (floored to whole units). */
  nearContrast: Uint8Array;
  /** The same within the radius plus the low-pass's reach. */
  contrast: Uint8Array;
  /** 1 where the mean lightness over the reach lies above the middle of its range: type on a light ground. */
  lightGround: Uint8Array;
}

export const CACHE_MAX_PIXELS = 24_000_000;
const cache = new WeakMap<ArrayBufferLike, Map<string, PreparedRect>>();

/**
 * The prepared artwork over `rect`: a view into the cached whole page when the page is small enough, else
 * computed for the rectangle alone (its border rows then see a clipped window, so callers keep a halo).
 */
export async function preparedRect(art: RgbaImage, rect: PxRect, w: ContrastWindows): Promise<PreparedRect> {
  if (art.width * art.height > CACHE_MAX_PIXELS) return prepare(art, rect, w);
  const key = `${art.data.byteOffset}:${art.width}x${art.height}:${w.opticalBlurPx}:${w.sigmaPx}:${w.radiusPx}:${w.reachPx}`;
  let byKey = cache.get(art.data.buffer);
  if (!byKey) cache.set(art.data.buffer, (byKey = new Map()));
  let whole = byKey.get(key);
  if (!whole) {
    whole = await prepare(art, { x: 0, y: 0, w: art.width, h: art.height }, w);
    // One scanner's sheets keep to one or two blur steps: hold two preparations of a page at most.
    if (byKey.size >= 2) byKey.delete(byKey.keys().next().value!);
    byKey.set(key, whole);
  }
  return sub(whole, rect);
}

async function prepare(art: RgbaImage, rect: PxRect, w: ContrastWindows): Promise<PreparedRect> {
  const rgba = cropRgba(art.data, art.width, rect);
  const seen = w.opticalBlurPx > 0 ? await opticalBlur(rgba, rect.w, rect.h, w.opticalBlurPx) : rgba;
  return prepareLowPassed(await lowPass(seen, rect.w, rect.h, w.sigmaPx), rect, w);
}

/** The prepared artwork from an already low-passed RGBA rectangle. */
export function prepareLowPassed(low: Uint8Array, rect: PxRect, w: ContrastWindows): PreparedRect {
  const lab = rgbaToLab(low);
  const near = new Uint8Array(rect.w * rect.h);
  const contrast = new Uint8Array(rect.w * rect.h);
  const lightGround = new Uint8Array(rect.w * rect.h);
  localContrast(lab, rect.w, rect.h, w.radiusPx, near, null);
  localContrast(lab, rect.w, rect.h, w.reachPx, contrast, lightGround);
  return { rect, low, lab, nearContrast: near, contrast, lightGround };
}

/** A rectangle of a prepared whole page (copied unless it is a run of full rows). */
function sub(whole: PreparedRect, r: PxRect): PreparedRect {
  const W = whole.rect.w;
  if (r.x === 0 && r.w === W) {
    const a = r.y * W, b = (r.y + r.h) * W;
    return {
      rect: r,
      low: whole.low.subarray(a * 4, b * 4),
      lab: whole.lab.subarray(a * 3, b * 3),
      nearContrast: whole.nearContrast.subarray(a, b),
      contrast: whole.contrast.subarray(a, b),
      lightGround: whole.lightGround.subarray(a, b),
    };
  }
  const n = r.w * r.h;
  const out: PreparedRect = {
    rect: r,
    low: new Uint8Array(n * 4),
    lab: new Float32Array(n * 3),
    nearContrast: new Uint8Array(n),
    contrast: new Uint8Array(n),
    lightGround: new Uint8Array(n),
  };
  for (let row = 0; row < r.h; row++) {
    const from = (r.y + row) * W + r.x, to = row * r.w;
    out.low.set(whole.low.subarray(from * 4, (from + r.w) * 4), to * 4);
    out.lab.set(whole.lab.subarray(from * 3, (from + r.w) * 3), to * 3);
    out.nearContrast.set(whole.nearContrast.subarray(from, from + r.w), to);
    out.contrast.set(whole.contrast.subarray(from, from + r.w), to);
    out.lightGround.set(whole.lightGround.subarray(from, from + r.w), to);
  }
  return out;
}

/**
 * ΔE*ab extent (the diagonal of the L*, a*, b* ranges) over the square of radius k around each pixel, clipped
 * at the borders, by separable running minima and maxima; and, when asked, whether the window's mean L* lies
 * above the middle of its L* range.
 */
function localContrast(lab: Float32Array, w: number, h: number, k: number, out: Uint8Array, lightGround: Uint8Array | null): void {
  const n = w * h;
  const lo = [new Float32Array(n), new Float32Array(n), new Float32Array(n)];
  const hi = [new Float32Array(n), new Float32Array(n), new Float32Array(n)];
  const line = new Float32Array(Math.max(w, h));
  const lineLo = new Float32Array(Math.max(w, h)), lineHi = new Float32Array(Math.max(w, h));
  for (let c = 0; c < 3; c++) {
    // Rows, then columns of the row result.
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) line[x] = lab[(y * w + x) * 3 + c];
      slidingExtent(line, w, k, lineLo, lineHi);
      lo[c].set(lineLo.subarray(0, w), y * w);
      hi[c].set(lineHi.subarray(0, w), y * w);
    }
    const colLo = new Float32Array(h), colHi = new Float32Array(h);
    for (let x = 0; x < w; x++) {
      for (let y = 0; y < h; y++) { colLo[y] = lo[c][y * w + x]; colHi[y] = hi[c][y * w + x]; }
      slidingExtent(colLo, h, k, lineLo, null);
      for (let y = 0; y < h; y++) lo[c][y * w + x] = lineLo[y];
      slidingExtent(colHi, h, k, null, lineHi);
      for (let y = 0; y < h; y++) hi[c][y * w + x] = lineHi[y];
    }
  }
  for (let i = 0; i < n; i++) {
    const dl = hi[0][i] - lo[0][i], da = hi[1][i] - lo[1][i], db = hi[2][i] - lo[2][i];
    const e = Math.sqrt(dl * dl + da * da + db * db);
    out[i] = e >= 255 ? 255 : e | 0;
  }
  if (lightGround) lightGroundOf(lab, w, h, k, lo[0], hi[0], lightGround);
}

/** Running minimum and maximum of `src` over [i − k, i + k], clipped at the ends (k is a few pixels). */
function slidingExtent(src: Float32Array, n: number, k: number, min: Float32Array | null, max: Float32Array | null): void {
  for (let i = 0; i < n; i++) {
    const a = i - k < 0 ? 0 : i - k, b = i + k >= n ? n - 1 : i + k;
    let mn = src[a], mx = src[a];
    for (let j = a + 1; j <= b; j++) {
      const v = src[j];
      if (v < mn) mn = v;
      if (v > mx) mx = v;
    }
    if (min) min[i] = mn;
    if (max) max[i] = mx;
  }
}

/** Mean L* over the clipped window (box sums) against the middle of its range. */
function lightGroundOf(lab: Float32Array, w: number, h: number, k: number, lMin: Float32Array, lMax: Float32Array, out: Uint8Array): void {
  const rows = new Float64Array(w * h);
  for (let y = 0; y < h; y++) {
    let s = 0;
    for (let x = 0; x <= Math.min(k, w - 1); x++) s += lab[(y * w + x) * 3];
    for (let x = 0; x < w; x++) {
      rows[y * w + x] = s;
      if (x + k + 1 < w) s += lab[(y * w + x + k + 1) * 3];
      if (x - k >= 0) s -= lab[(y * w + x - k) * 3];
    }
  }
  for (let x = 0; x < w; x++) {
    const cols = Math.min(w - 1, x + k) - Math.max(0, x - k) + 1;
    let s = 0;
    for (let y = 0; y <= Math.min(k, h - 1); y++) s += rows[y * w + x];
    for (let y = 0; y < h; y++) {
      const count = cols * (Math.min(h - 1, y + k) - Math.max(0, y - k) + 1);
      const i = y * w + x;
      out[i] = s > count * 0.5 * (lMin[i] + lMax[i]) ? 1 : 0;
      if (y + k + 1 < h) s += rows[(y + k + 1) * w + x];
      if (y - k >= 0) s -= rows[(y - k) * w + x];
    }
  }
}
