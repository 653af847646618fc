// The artwork side of the comparison, prepared once per artwork and reused for every sheet of the run: its
// low-pass and the local contrast (from its CIELAB) that sizes the edge allowance. None of it depends on the
// scan, and a press run compares hundreds of sheets with one artwork, so a sheet pays only for its own side.
//
// Prepared data is kept per thread for artworks up to CACHE_MAX_PIXELS (7 bytes a pixel; the CIELAB is not kept:
// the comparison takes it from the low-pass through its colour cache); larger pages
// (a B1 sheet at 300 dpi is ~98 megapixels) are prepared band by band for each sheet instead, so memory stays
// bounded. Never shared between threads.
import { ArtworkCache } from "./artwork-cache";
import { rgbaToLab } from "../colour/colour";
import { lowPass } from "../colour/normalise";
import { opticalBlur } from "../colour/optics";
import { cropRgba, type PxRect } from "../raster";
import type { RgbaImage } from "../types";

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

/**
 * Beyond the reach, how far a scan still carries an edge's error: a JPEG scan's chroma is kept at half
 * resolution and coded in 16-pixel blocks, so a strong edge bleeds colour up to about that many scan pixels into
 * a solid (seen as "colour shifts" inside the black patch beside yellow and red on simulated q92 scans).
 */
export const BLEED_PX = 12;

/** The prepared artwork over one rectangle (rows of `rect.w` pixels). */
export interface PreparedRect {
  rect: PxRect;
  /** Low-passed artwork, RGBA 8-bit. */
  low: Uint8Array;
  /** ΔE*ab extent of the CIELAB (D65) of `low` within the registration radius plus the low-pass's reach (floored to whole units). */
  contrast: Uint8Array;
  /** The same within at least the reach plus BLEED_PX (on 2-pixel blocks, so up to 2 pixels more). */
  wideContrast: Uint8Array;
  /** 1 where the mean lightness over the reach lies above the middle of its range: type on a light ground. */
  lightGround: Uint8Array;
}

export const CACHE_MAX_PIXELS = 24_000_000;
/** One scanner's sheets keep to one or two blur steps: two preparations of a page at most. */
const cache = new ArtworkCache<PreparedRect>(2);

/**
 * The prepared artwork over `rect`: a view into the cached whole page when the page is small enough, else
 * computed for the rectangle alone (its border rows then see a clipped window, so callers keep a halo).
 */
export async function preparedRect(art: RgbaImage, rect: PxRect, w: ContrastWindows): Promise<PreparedRect> {
  const key = windowsKey(w);
  const stored = storedRows.peek(art, key);
  if (stored) {
    // Rows of a stored preparation (prepared-store.ts), read band by band, so even a B1 page stays bounded.
    const band = await stored(rect.y, rect.h);
    if (rect.x === 0 && rect.w === art.width) return { ...band, rect };
    return sub({ ...band, rect: { x: 0, y: 0, w: art.width, h: rect.h } }, { ...rect, y: 0 }, rect);
  }
  if (art.width * art.height > CACHE_MAX_PIXELS) return prepare(art, rect, w);
  const whole = cache.peek(art, key) ?? cache.put(art, key, await prepare(art, { x: 0, y: 0, w: art.width, h: art.height }, w));
  return sub(whole, rect);
}

const windowsKey = (w: ContrastWindows) => `${w.opticalBlurPx}:${w.sigmaPx}:${w.radiusPx}:${w.reachPx}`;

/** Full rows [y, y + h) of a page's preparation, from wherever it is kept. */
export type PreparedRows = (y: number, h: number) => Promise<PreparedRect>;
const storedRows = new ArtworkCache<PreparedRows>(2);

/**
 * Use a preparation made earlier (loaded from a file or the bucket) for this artwork and these windows, in this
 * thread: a whole page goes into the cache, rows read on demand are kept as their source.
 */
export function adoptPrepared(art: RgbaImage, w: ContrastWindows, prepared: PreparedRect | PreparedRows): void {
  if (typeof prepared === "function") storedRows.put(art, windowsKey(w), prepared);
  else cache.put(art, windowsKey(w), prepared);
}

/** The whole page's preparation if this thread made or was given it (pages up to CACHE_MAX_PIXELS). */
export function preparedPageIfKept(art: RgbaImage, w: ContrastWindows): PreparedRect | undefined {
  return cache.peek(art, windowsKey(w));
}

/**
 * Full rows [y, y + h) of the page prepared from the artwork with `halo` rows around them, so that windows at
 * the band's edges see what a whole-page preparation would (for making a large page's preparation band by band).
 */
export async function preparePageRows(art: RgbaImage, y: number, h: number, w: ContrastWindows, halo: number): Promise<PreparedRect> {
  const y0 = Math.max(0, y - halo), y1 = Math.min(art.height, y + h + halo);
  const ext = await prepare(art, { x: 0, y: y0, w: art.width, h: y1 - y0 }, w);
  return sub({ ...ext, rect: { x: 0, y: 0, w: art.width, h: y1 - y0 } }, { x: 0, y: y - y0, w: art.width, h }, { x: 0, y, w: art.width, h });
}

async function prepare(art: RgbaImage, rect: PxRect, w: ContrastWindows): Promise<PreparedRect> {
  const rgba = cropRgba(art.data, art.width, rect);
  const seen = w.opticalBlurPx > 0 ? opticalBlur(rgba, rect.w, rect.h, w.opticalBlurPx) : rgba;
  return prepareLowPassed(await lowPass(seen, rect.w, rect.h, w.sigmaPx), rect, w);
}

/** The prepared artwork from an already low-passed RGBA rectangle. */
export function prepareLowPassed(low: Uint8Array, rect: PxRect, w: ContrastWindows): PreparedRect {
  const lab = rgbaToLab(low);
  const contrast = new Uint8Array(rect.w * rect.h);
  const lightGround = new Uint8Array(rect.w * rect.h);
  localContrast(lab, rect.w, rect.h, w.reachPx, contrast, lightGround);
  const wideContrast = blockContrast(lab, rect.w, rect.h, w.reachPx + BLEED_PX);
  verticalScratch = new Float32Array(0);
  return { rect, low, contrast, wideContrast, lightGround };
}

/**
 * A rectangle of a prepared whole page (copied unless it is a run of full rows); `as` is the rectangle the
 * result says it covers (r itself unless the prepared rows start below the page's top).
 */
function sub(whole: PreparedRect, r: PxRect, as: PxRect = r): PreparedRect {
  const W = whole.rect.w;
  if (r.x === 0 && r.w === W) {
    const a = r.y * W, b = (r.y + r.h) * W;
    return {
      rect: as,
      low: whole.low.subarray(a * 4, b * 4),
      contrast: whole.contrast.subarray(a, b),
      wideContrast: whole.wideContrast.subarray(a, b),
      lightGround: whole.lightGround.subarray(a, b),
    };
  }
  const n = r.w * r.h;
  const out: PreparedRect = {
    rect: as,
    low: new Uint8Array(n * 4),
    contrast: new Uint8Array(n),
    wideContrast: new Uint8Array(n),
    lightGround: new Uint8Array(n),
  };
  for (let row = 0; row < r.h; row++) {
    const from = (r.y + row) * W + r.x, to = row * r.w;
    out.low.set(whole.low.subarray(from * 4, (from + r.w) * 4), to * 4);
    out.contrast.set(whole.contrast.subarray(from, from + r.w), to);
    out.wideContrast.set(whole.wideContrast.subarray(from, from + r.w), to);
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
    // Columns row by row (a column at a time would stride through memory).
    verticalExtent(lo[c], hi[c], w, h, k);
  }
  out.set(extentOf(lo, hi, n));
  if (lightGround) lightGroundOf(lab, w, h, k, lo[0], hi[0], lightGround);
}

/**
 * ΔE*ab extent over a square of radius at least k (at most k + 2) around each pixel: extremes of 2 × 2 blocks,
 * then over the blocks near the pixel's own. For the bleed allowance, at a quarter of the per-pixel passes (on
 * 4 × 4 blocks the window grew by up to 6 px, and a colour-shifted patch 2 mm inside a tint at 200 dpi was lost).
 */
function blockContrast(lab: Float32Array, w: number, h: number, k: number): Uint8Array {
  const B = 2, bw = Math.ceil(w / B), bh = Math.ceil(h / B), nb = bw * bh;
  const lo = [0, 1, 2].map(() => new Float32Array(nb).fill(Infinity));
  const hi = [0, 1, 2].map(() => new Float32Array(nb).fill(-Infinity));
  for (let y = 0; y < h; y++) {
    const rowBlock = (y >> 1) * bw;
    for (let x = 0; x < w; x++) {
      const b = rowBlock + (x >> 1), p = (y * w + x) * 3;
      for (let c = 0; c < 3; c++) {
        const v = lab[p + c];
        if (v < lo[c][b]) lo[c][b] = v;
        if (v > hi[c][b]) hi[c][b] = v;
      }
    }
  }
  // Blocks within kb of a pixel's block cover [x − k, x + k] whatever the pixel's place in its block.
  const kb = Math.ceil((k + B - 1) / B);
  const line = new Float32Array(bw), lineOut = new Float32Array(bw);
  for (let c = 0; c < 3; c++) {
    for (let by = 0; by < bh; by++) {
      line.set(lo[c].subarray(by * bw, (by + 1) * bw));
      slidingExtent(line, bw, kb, lineOut, null);
      lo[c].set(lineOut, by * bw);
      line.set(hi[c].subarray(by * bw, (by + 1) * bw));
      slidingExtent(line, bw, kb, null, lineOut);
      hi[c].set(lineOut, by * bw);
    }
    verticalExtent(lo[c], hi[c], bw, bh, kb);
  }
  const blockOut = extentOf(lo, hi, nb);
  const out = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) out[y * w + x] = blockOut[(y >> 1) * bw + (x >> 1)];
  return out;
}

/** The diagonal of the L*, a*, b* ranges from per-channel minima and maxima, floored to whole units up to 255. */
function extentOf(lo: Float32Array[], hi: Float32Array[], n: number): Uint8Array {
  const out = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const dl = hi[0][i] - lo[0][i], da = hi[1][i] - lo[1][i], db = hi[2][i] - lo[2][i];
    const e = Math.sqrt(dl * dl + da * da + db * db);
    out[i] = e >= 255 ? 255 : e | 0;
  }
  return out;
}

/**
 * Running minimum and maximum of `src` over [i − k, i + k], clipped at the ends: van Herk's and Gil & Werman's
 * method (blocks of 2k + 1, running extremes forward and backward inside each; three comparisons a value
 * whatever k), with the clipped ends done directly. M. van Herk, Pattern Recognition Letters 13(7), 1992;
 * J. Gil & M. Werman, IEEE TPAMI 15(5), 1993 (cited from memory).
 */
function slidingExtent(src: Float32Array, n: number, k: number, min: Float32Array | null, max: Float32Array | null): void {
  const size = 2 * k + 1;
  if (extentScratch.length < 4 * n) extentScratch = new Float32Array(4 * n);
  const gMin = extentScratch.subarray(0, n), gMax = extentScratch.subarray(n, 2 * n);
  const hMin = extentScratch.subarray(2 * n, 3 * n), hMax = extentScratch.subarray(3 * n, 4 * n);
  for (let i = 0, inBlock = 0; i < n; i++, inBlock = inBlock === size - 1 ? 0 : inBlock + 1) {
    const v = src[i];
    if (inBlock === 0) { gMin[i] = v; gMax[i] = v; }
    else { gMin[i] = v < gMin[i - 1] ? v : gMin[i - 1]; gMax[i] = v > gMax[i - 1] ? v : gMax[i - 1]; }
  }
  for (let i = n - 1, inBlock = (n - 1) % size; i >= 0; i--, inBlock = inBlock === 0 ? size - 1 : inBlock - 1) {
    const v = src[i];
    if (i === n - 1 || inBlock === size - 1) { hMin[i] = v; hMax[i] = v; }
    else { hMin[i] = v < hMin[i + 1] ? v : hMin[i + 1]; hMax[i] = v > hMax[i + 1] ? v : hMax[i + 1]; }
  }
  for (let i = 0; i < n; i++) {
    const a = i - k, b = i + k;
    let mn: number, mx: number;
    if (a >= 0 && b < n) {
      mn = hMin[a] < gMin[b] ? hMin[a] : gMin[b];
      mx = hMax[a] > gMax[b] ? hMax[a] : gMax[b];
    } else {
      const from = a < 0 ? 0 : a, to = b >= n ? n - 1 : b;
      mn = src[from]; mx = src[from];
      for (let j = from + 1; j <= to; j++) { const v = src[j]; if (v < mn) mn = v; if (v > mx) mx = v; }
    }
    if (min) min[i] = mn;
    if (max) max[i] = mx;
  }
}
// Scratch of the running extremes, kept between calls: a page's planes are tens of megabytes each, and fresh
// ones for every pass cost more in page faults than the passes themselves. Per thread; the large one is let go
// once a preparation is done.
let extentScratch = new Float32Array(0);
let verticalScratch = new Float32Array(0);

/**
 * In place: the minimum of each pixel of `lo` and the maximum of each pixel of `hi` over rows [y − k, y + k],
 * clipped; van Herk / Gil–Werman by whole rows, so memory is read in order.
 */
function verticalExtent(lo: Float32Array, hi: Float32Array, w: number, h: number, k: number): void {
  const n = w * h;
  if (verticalScratch.length < 4 * n) verticalScratch = new Float32Array(4 * n);
  const gLo = verticalScratch.subarray(0, n), backLo = verticalScratch.subarray(n, 2 * n);
  const gHi = verticalScratch.subarray(2 * n, 3 * n), backHi = verticalScratch.subarray(3 * n, 4 * n);
  const size = 2 * k + 1;
  // Running extremes forward from each block's first row (g) and backward from its last (back).
  for (let y = 0; y < h; y++) {
    const o = y * w;
    if (y % size === 0) {
      gLo.set(lo.subarray(o, o + w), o);
      gHi.set(hi.subarray(o, o + w), o);
      continue;
    }
    for (let x = o; x < o + w; x++) {
      const l = lo[x], pl = gLo[x - w], u = hi[x], pu = gHi[x - w];
      gLo[x] = l < pl ? l : pl;
      gHi[x] = u > pu ? u : pu;
    }
  }
  for (let y = h - 1; y >= 0; y--) {
    const o = y * w;
    if (y === h - 1 || (y + 1) % size === 0) {
      backLo.set(lo.subarray(o, o + w), o);
      backHi.set(hi.subarray(o, o + w), o);
      continue;
    }
    for (let x = o; x < o + w; x++) {
      const l = lo[x], pl = backLo[x + w], u = hi[x], pu = backHi[x + w];
      backLo[x] = l < pl ? l : pl;
      backHi[x] = u > pu ? u : pu;
    }
  }
  // Window [a, b] clipped to the rows that exist: it spans at most two blocks, so it is back from a to its
  // block's end and g from the next block's start to b, or one of them alone where the window keeps to a block
  // (the first block starts at row 0, and back restarts at the last row).
  for (let y = 0; y < h; y++) {
    const a = Math.max(0, y - k), b = Math.min(h - 1, y + k), o = y * w;
    const fromBack = a * w, fromG = b * w;
    if (a === 0 && b < size) {
      lo.set(gLo.subarray(fromG, fromG + w), o);
      hi.set(gHi.subarray(fromG, fromG + w), o);
    } else if (Math.floor(a / size) === Math.floor(b / size)) {
      lo.set(backLo.subarray(fromBack, fromBack + w), o);
      hi.set(backHi.subarray(fromBack, fromBack + w), o);
    } else {
      for (let x = 0; x < w; x++) {
        const l1 = backLo[fromBack + x], l2 = gLo[fromG + x], u1 = backHi[fromBack + x], u2 = gHi[fromG + x];
        lo[o + x] = l1 < l2 ? l1 : l2;
        hi[o + x] = u1 > u2 ? u1 : u2;
      }
    }
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
  // Column sums of the row sums, row by row: the window's sum moves down one row at a time.
  const sum = new Float64Array(w);
  for (let y = 0; y <= Math.min(k, h - 1); y++) for (let x = 0; x < w; x++) sum[x] += rows[y * w + x];
  for (let y = 0; y < h; y++) {
    const height = Math.min(h - 1, y + k) - Math.max(0, y - k) + 1;
    for (let x = 0; x < w; x++) {
      const count = (Math.min(w - 1, x + k) - Math.max(0, x - k) + 1) * height;
      const i = y * w + x;
      out[i] = sum[x] > count * 0.5 * (lMin[i] + lMax[i]) ? 1 : 0;
    }
    if (y + k + 1 < h) for (let x = 0; x < w; x++) sum[x] += rows[(y + k + 1) * w + x];
    if (y - k >= 0) for (let x = 0; x < w; x++) sum[x] -= rows[(y - k) * w + x];
  }
}
