// The scan resampled into the artwork's pixel grid (bilinear), one rectangle at a time: a B1 sheet at 300 dpi
// is ~98 megapixels, so callers work in tiles and nothing full-size beyond the 8-bit result is allocated.
// Plain JavaScript on purpose: OpenCV's warp would first need the whole scan copied into its 1 GB heap.
import type { Affine } from "./affine";
import type { Alignment, DisplacementField, RgbaImage } from "../types";

export interface PxRegion {
  x: number;
  y: number;
  w: number;
  h: number;
}

/**
 * Output buffers reused from one region to the next (the caller is done with a region before the next). Not
 * zeroed: the warp writes every pixel and mask byte of its region.
 */
export class WarpBuffers {
  private rgbaBuffer = new Uint8Array(0);
  private maskBuffer = new Uint8Array(0);
  pixels(n: number): Uint8Array {
    if (this.rgbaBuffer.length < n) this.rgbaBuffer = new Uint8Array(n);
    return this.rgbaBuffer.subarray(0, n);
  }
  mask(n: number): Uint8Array {
    if (this.maskBuffer.length < n) this.maskBuffer = new Uint8Array(n);
    return this.maskBuffer.subarray(0, n);
  }
}

/**
 * `region` (artwork px, default the whole page) of the scan seen through the alignment; `mask` is 1 where the
 * scan covers the pixel. With a local field the scan point of artwork pixel p is artworkToScan(p + field(p)).
 */
export function warpScanToArtwork(
  scan: RgbaImage,
  alignment: Pick<Alignment, "artworkToScan" | "localField">,
  artwork: { width: number; height: number },
  region: PxRegion = { x: 0, y: 0, w: artwork.width, h: artwork.height },
  into?: WarpBuffers,
  /** 4: RGBA (alpha 255); 3: RGB, as the low-pass takes it. */
  channels: 3 | 4 = 4,
): { image: RgbaImage; mask: Uint8Array } {
  const { w, h } = region;
  if (!(w > 0 && h > 0 && Number.isInteger(w) && Number.isInteger(h))) throw new RangeError("region must have a positive integer size");
  const out = into ? into.pixels(w * h * channels) : new Uint8Array(w * h * channels);
  const mask = into ? into.mask(w * h) : new Uint8Array(w * h);
  const m = alignment.artworkToScan as Affine;
  const field = alignment.localField;
  const dx = field ? new Float64Array(w) : null, dy = field ? new Float64Array(w) : null;
  const src = scan.data, sw = scan.width, sh = scan.height;
  // Whole-pixel reads of the scan (little-endian RGBA words) for the fixed-point path.
  const src32 = src.byteOffset % 4 === 0 ? new Int32Array(src.buffer, src.byteOffset, sw * sh) : null;
  const out32 = channels === 4 ? new Int32Array(out.buffer, out.byteOffset, w * h) : null;
  const outView = new DataView(out.buffer, out.byteOffset, out.length);
  for (let row = 0; row < h; row++) {
    const y = region.y + row;
    if (field) fieldRow(field, region.x, y, dx!, dy!);
    // Scan position of the row's first pixel and its step per column (the affine part, exact in doubles).
    let xs = m[0] * region.x + m[1] * y + m[2], ys = m[3] * region.x + m[4] * y + m[5];
    // Without a local field, the columns whose scan point lies well inside the scan form one run: resample it
    // in a loop with no bounds checks, and leave only the ends to the careful loop below.
    let fastFrom = w, fastTo = w;
    if (!field && src32 !== null) {
      [fastFrom, fastTo] = insideRun(xs, m[0], sw, w, insideRun(ys, m[3], sh, w, [0, w]));
      if (fastTo > fastFrom) {
        mask.fill(1, row * w + fastFrom, row * w + fastTo);
        resampleRun(src32, sw, out, out32, outView, row * w, xs, ys, m[0], m[3], fastFrom, fastTo);
      }
    }
    for (let col = 0; col < w; col++, xs += m[0], ys += m[3]) {
      if (col === fastFrom && fastTo > fastFrom) {
        xs += m[0] * (fastTo - fastFrom);
        ys += m[3] * (fastTo - fastFrom);
        col = fastTo;
        if (col >= w) break;
      }
      let px = xs, py = ys;
      if (field) {
        px += m[0] * dx![col] + m[1] * dy![col];
        py += m[3] * dx![col] + m[4] * dy![col];
      }
      if (!(px >= -0.5 && py >= -0.5 && px <= sw - 0.5 && py <= sh - 0.5)) {
        // Beyond the scan: black and uncovered (the buffers come unzeroed).
        const o = (row * w + col) * channels;
        out[o] = out[o + 1] = out[o + 2] = 0;
        if (channels === 4) out[o + 3] = 0;
        mask[row * w + col] = 0;
        continue;
      }
      mask[row * w + col] = 1;
      if (src32 !== null && px >= 0 && py >= 0 && px < sw - 1 && py < sh - 1) {
        resampleRun(src32, sw, out, out32, outView, row * w, px, py, 0, 0, col, col + 1);
        continue;
      }
      // Along the scan's border: clamp to the outer pixel centres, then interpolate between the four neighbours.
      const cx = px < 0 ? 0 : px > sw - 1 ? sw - 1 : px, cy = py < 0 ? 0 : py > sh - 1 ? sh - 1 : py;
      const x0 = cx >= sw - 1 ? Math.max(0, sw - 2) : cx | 0, y0 = cy >= sh - 1 ? Math.max(0, sh - 2) : cy | 0;
      const fx = sw > 1 ? cx - x0 : 0, fy = sh > 1 ? cy - y0 : 0;
      const p00 = (y0 * sw + x0) * 4;
      const p01 = sw > 1 ? p00 + 4 : p00;
      const p10 = sh > 1 ? p00 + sw * 4 : p00;
      const p11 = sw > 1 ? p10 + 4 : p10;
      const w00 = (1 - fx) * (1 - fy), w01 = fx * (1 - fy), w10 = (1 - fx) * fy, w11 = fx * fy;
      const o = (row * w + col) * channels;
      out[o] = w00 * src[p00] + w01 * src[p01] + w10 * src[p10] + w11 * src[p11] + 0.5;
      out[o + 1] = w00 * src[p00 + 1] + w01 * src[p01 + 1] + w10 * src[p10 + 1] + w11 * src[p11 + 1] + 0.5;
      out[o + 2] = w00 * src[p00 + 2] + w01 * src[p01 + 2] + w10 * src[p10 + 2] + w11 * src[p11 + 2] + 0.5;
      if (channels === 4) out[o + 3] = 255;
    }
  }
  return { image: { width: w, height: h, data: out }, mask };
}

/**
 * Columns [from, to) of `within` where v0 + step·col lies in [1, size − 2] (a pixel clear of the scan's last
 * row or column, so the four neighbours exist), rounded inwards.
 */
function insideRun(v0: number, step: number, size: number, w: number, within: [number, number]): [number, number] {
  let [from, to] = within;
  const lo = 1, hi = size - 2;
  if (step === 0) return v0 >= lo && v0 <= hi ? [from, to] : [0, 0];
  const a = (lo - v0) / step, b = (hi - v0) / step;
  from = Math.max(from, Math.ceil(Math.min(a, b)));
  to = Math.min(to, Math.floor(Math.max(a, b)) + 1, w);
  return to > from ? [from, to] : [0, 0];
}

/** Columns resampled from one exact (double) scan position before the next: 1/65536 px steps drift < 0.004 px. */
const SEGMENT = 256;

/** Bilinear resampling of columns [from, to) of one output row, every scan point inside the scan. */
function resampleRun(src32: Int32Array, sw: number, out: Uint8Array, out32: Int32Array | null, outView: DataView, rowStart: number, xs0: number, ys0: number, sx: number, sy: number, from: number, to: number): void {
  // Positions in 16.16 fixed point relative to a whole pixel taken at each segment's start: integer steps
  // instead of a double-to-integer conversion and a rounding per coordinate and pixel.
  const lastCol = to - 1;
  const stepX = Math.round(sx * 65536) | 0, stepY = Math.round(sy * 65536) | 0;
  for (let start = from; start < to; start += SEGMENT) {
    const end = Math.min(to, start + SEGMENT);
    const px0 = xs0 + sx * start, py0 = ys0 + sy * start;
    const bx = Math.floor(px0) | 0, by = Math.floor(py0) | 0;
    let fxp = Math.round((px0 - bx) * 65536) | 0, fyp = Math.round((py0 - by) * 65536) | 0;
    for (let col = start; col < end; col++, fxp = (fxp + stepX) | 0, fyp = (fyp + stepY) | 0) {
      // Weights at 1/16 px (a 1/32 px error at most), two channels a multiply: with weights summing to 256,
      // red and blue (or green alone) products stay in separate 16-bit fields.
      const x0 = bx + (fxp >> 16), y0 = by + (fyp >> 16);
      const fx = ((fxp & 0xffff) + 0x800) >> 12, fy = ((fyp & 0xffff) + 0x800) >> 12;
      const p = y0 * sw + x0;
      const a = src32[p], b = src32[p + 1], c = src32[p + sw], d = src32[p + sw + 1];
      const w00 = (16 - fx) * (16 - fy), w01 = fx * (16 - fy), w10 = (16 - fx) * fy, w11 = fx * fy;
      // Int32 views and wrapping multiplies keep V8 in 32-bit integers (every pixel's alpha sets the sign bit).
      let rb = (Math.imul(a & 0xff00ff, w00) + Math.imul(b & 0xff00ff, w01)) | 0;
      rb = (rb + Math.imul(c & 0xff00ff, w10)) | 0;
      rb = (rb + Math.imul(d & 0xff00ff, w11) + 0x800080) | 0;
      const g = ((a >>> 8) & 0xff) * w00 + ((b >>> 8) & 0xff) * w01 + ((c >>> 8) & 0xff) * w10 + ((d >>> 8) & 0xff) * w11 + 0x80;
      if (out32 !== null) out32[rowStart + col] = ((rb >>> 8) & 0xff00ff) | (g & 0xff00) | -0x1000000;
      else {
        const o = (rowStart + col) * 3;
        // One unaligned little-endian word: its fourth byte is the next pixel's red, written next (the run's
        // last pixel is written bytewise, so nothing outside the run is touched).
        if (col < lastCol) outView.setInt32(o, ((rb >>> 8) & 0xff00ff) | (g & 0xff00), true);
        else {
          out[o] = (rb >>> 8) & 0xff;
          out[o + 1] = g >>> 8;
          out[o + 2] = rb >>> 24;
        }
      }
    }
  }
}

/** Displacements of one row of artwork pixels, bilinear between the field's nodes (held at the edges). */
export function fieldRow(f: DisplacementField, x0: number, y: number, dx: Float64Array, dy: Float64Array) {
  const gy = Math.min(Math.max((y - f.originY) / f.step, 0), f.rows - 1);
  const j0 = Math.min(Math.floor(gy), Math.max(0, f.rows - 2)), ty = f.rows > 1 ? gy - j0 : 0;
  const j1 = f.rows > 1 ? j0 + 1 : j0;
  for (let i = 0; i < dx.length; i++) {
    const gx = Math.min(Math.max((x0 + i - f.originX) / f.step, 0), f.cols - 1);
    const i0 = Math.min(Math.floor(gx), Math.max(0, f.cols - 2)), tx = f.cols > 1 ? gx - i0 : 0;
    const i1 = f.cols > 1 ? i0 + 1 : i0;
    const a = j0 * f.cols + i0, b = j0 * f.cols + i1, c = j1 * f.cols + i0, d = j1 * f.cols + i1;
    dx[i] = (1 - ty) * ((1 - tx) * f.dx[a] + tx * f.dx[b]) + ty * ((1 - tx) * f.dx[c] + tx * f.dx[d]);
    dy[i] = (1 - ty) * ((1 - tx) * f.dy[a] + tx * f.dy[b]) + ty * ((1 - tx) * f.dy[c] + tx * f.dy[d]);
  }
}
