// Small grey copies of a page for registration. A level is the luma of the RGBA image averaged over k × k
// blocks of full-resolution pixels (a box filter: what a lower-resolution scanner would integrate), so
// level pixel (i, j) is centred on full pixel (k·i + (k−1)/2, k·j + (k−1)/2). Integer factors keep that map
// exact; the registration absorbs any remaining resolution ratio in its scale. Done in plain JavaScript in
// one pass over rows so that a 100-megapixel sheet never has to be copied whole into the OpenCV heap.
import type { Affine } from "./affine";
import type { RgbaImage } from "../types";

export interface GreyLevel {
  width: number;
  height: number;
  /**
   * Luma 0–255: ITU-R BT.601 weights 0.299 / 0.587 / 0.114 on the sRGB values, as OpenCV's RGB→grey
   * conversion (weights cited from memory).
   */
  data: Float32Array;
  /** Block size in full-resolution pixels. */
  k: number;
}

const cache = new WeakMap<object, Map<number, GreyLevel>>();

/** The level of block size k; cached per image buffer, so an artwork used for many scans is reduced once. */
export function greyLevel(img: RgbaImage, k: number, cacheIt = false): GreyLevel {
  let levels = cacheIt ? cache.get(img.data) : undefined;
  const hit = levels?.get(k);
  if (hit) return hit;
  // A cached level of half the block size is reduced 2 × 2 instead of reading the full image again.
  const finer = k % 2 === 0 ? levels?.get(k / 2) : undefined;
  const level = finer ? halve(finer) : reduce(img, k);
  if (cacheIt) {
    if (!levels) cache.set(img.data, (levels = new Map()));
    levels.set(k, level);
  }
  return level;
}

/** The level of twice the block size, by 2 × 2 averaging of `l` (exactly the 2k box of the full image). */
export function halve(l: GreyLevel): GreyLevel {
  const w = Math.max(1, l.width >> 1), h = Math.max(1, l.height >> 1);
  const out = new Float32Array(w * h), d = l.data, lw = l.width;
  if (l.width < 2 || l.height < 2) return { width: l.width, height: l.height, data: l.data, k: l.k };
  for (let j = 0; j < h; j++) {
    const p = 2 * j * lw, q = p + lw;
    for (let i = 0; i < w; i++) out[j * w + i] = 0.25 * (d[p + 2 * i] + d[p + 2 * i + 1] + d[q + 2 * i] + d[q + 2 * i + 1]);
  }
  return { width: w, height: h, data: out, k: l.k * 2 };
}

/**
 * Grey of a w × h window of the level of block size k, at level pixel (x0, y0), computed from the RGBA on
 * demand (for patches: no full-size level of a large sheet is ever held). Outside the image: edge values.
 */
export function levelWindow(img: RgbaImage, k: number, x0: number, y0: number, w: number, h: number, out: Float32Array): Float32Array {
  const src = img.data, iw = img.width, ih = img.height, norm = 1 / (k * k);
  for (let v = 0; v < h; v++) {
    for (let u = 0; u < w; u++) {
      let s = 0;
      for (let dy = 0; dy < k; dy++) {
        const y = Math.min(ih - 1, Math.max(0, (y0 + v) * k + dy));
        let p = (y * iw + Math.min(iw - k, Math.max(0, (x0 + u) * k))) * 4;
        for (let dx = 0; dx < k; dx++, p += 4) s += 0.299 * src[p] + 0.587 * src[p + 1] + 0.114 * src[p + 2];
      }
      out[v * w + u] = s * norm;
    }
  }
  return out;
}

/** One pixel of the level of block size k, from the RGBA (edge values outside). */
export function levelPixel(img: RgbaImage, k: number, x: number, y: number): number {
  const src = img.data, iw = img.width, ih = img.height;
  const x0 = Math.min(iw - k, Math.max(0, x * k)), y0 = Math.min(ih - k, Math.max(0, y * k));
  let s = 0;
  for (let dy = 0; dy < k; dy++) {
    let p = ((y0 + dy) * iw + x0) * 4;
    for (let dx = 0; dx < k; dx++, p += 4) s += 0.299 * src[p] + 0.587 * src[p + 1] + 0.114 * src[p + 2];
  }
  return s / (k * k);
}

/** Level pixel → full-resolution pixel (pixel centres at integer coordinates). */
export function levelToFull(k: number): Affine {
  const o = (k - 1) / 2;
  return [k, 0, o, 0, k, o];
}

function reduce(img: RgbaImage, k: number): GreyLevel {
  const k1 = Math.max(1, Math.floor(k));
  const w = Math.max(1, Math.floor(img.width / k1));
  const h = Math.max(1, Math.floor(img.height / k1));
  const out = new Float32Array(w * h);
  const src = img.data;
  const taps = blockTaps(k1), nt = taps.length;
  const norm = 1 / (nt * nt);
  // Each pixel is read as one 32-bit word and its bands summed two at a time in 16-bit lanes (R with B, G with
  // A; 257 taps of 255 still fit a lane); luma is linear, so the block's mean luma is the luma of the band means.
  const words = nt <= 257 && src.byteOffset % 4 === 0 && LITTLE_ENDIAN ? new Uint32Array(src.buffer, src.byteOffset, img.width * img.height) : null;
  for (let j = 0; j < h; j++) {
    for (let t = 0; t < nt; t++) {
      const row = (j * k1 + taps[t]) * img.width;
      for (let i = 0, p0 = row; i < w; i++, p0 += k1) {
        let rb = 0, ga = 0;
        if (words) {
          for (let d = 0; d < nt; d++) {
            const v = words[p0 + taps[d]];
            rb += v & 0xff00ff;
            ga += (v >>> 8) & 0xff00ff;
          }
        } else {
          for (let d = 0; d < nt; d++) {
            const p = (p0 + taps[d]) * 4;
            rb += src[p] + src[p + 2] * 65536;
            ga += src[p + 1];
          }
        }
        out[j * w + i] += 0.299 * (rb & 0xffff) + 0.587 * (ga & 0xffff) + 0.114 * (rb >>> 16);
      }
    }
    for (let i = j * w; i < (j + 1) * w; i++) out[i] *= norm;
  }
  return { width: w, height: h, data: out, k: k1 };
}

const LITTLE_ENDIAN = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1;

/**
 * Offsets read inside a block: all of them for small blocks; for blocks of 8 and more every other one, and no
 * more than about 8 a side for large blocks (a level that small only needs the block's mean: at 300 dpi a
 * 4 mm block is 47 px, and reading 24 × 24 of its pixels made the level cost 40 ms on a B2 sheet, 9 × 9 about
 * 9 ms, with the same registration error), taken in mirrored pairs so their mean stays exactly at the block
 * centre (k − 1)/2.
 */
function blockTaps(k: number): number[] {
  if (k < 8) return Array.from({ length: k }, (_, i) => i);
  const step = Math.max(2, Math.ceil(k / MAX_TAPS));
  const taps = new Set<number>();
  for (let o = Math.floor((step - 1) / 2); o < k / 2; o += step) taps.add(o).add(k - 1 - o);
  if (k % 2 === 1) taps.add((k - 1) / 2);
  return [...taps].sort((a, b) => a - b);
}

const MAX_TAPS = 8;
