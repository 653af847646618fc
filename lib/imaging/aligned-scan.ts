// The scan seen in the artwork's pixel grid, one rectangle at a time, so that no full-size warped copy of the
// scan is ever held. Bilinear resampling through the alignment's artwork → scan affine.
import type { AffineMap, PxRect } from "./raster";
import type { RgbaImage } from "./types";

export interface AlignedPatch {
  /** RGBA of the rectangle, alpha 255. */
  rgba: Uint8Array;
  /** 1 where the scan covers the pixel. */
  mask: Uint8Array;
}

export type AlignedScanSource = (rect: PxRect) => AlignedPatch;

export function affineScanSource(scan: RgbaImage, m: AffineMap): AlignedScanSource {
  const identity = m[0] === 1 && m[1] === 0 && m[3] === 0 && m[4] === 1 && Number.isInteger(m[2]) && Number.isInteger(m[5]);
  return (rect) => (identity ? shifted(scan, rect, m[2], m[5]) : resampled(scan, rect, m));
}

function shifted(scan: RgbaImage, rect: PxRect, dx: number, dy: number): AlignedPatch {
  const rgba = new Uint8Array(rect.w * rect.h * 4);
  const mask = new Uint8Array(rect.w * rect.h);
  const src = scan.data;
  for (let row = 0; row < rect.h; row++) {
    const ys = rect.y + row + dy;
    if (ys < 0 || ys >= scan.height) continue;
    const xs0 = Math.max(0, rect.x + dx), xs1 = Math.min(scan.width, rect.x + dx + rect.w);
    if (xs1 <= xs0) continue;
    const to = row * rect.w + (xs0 - rect.x - dx);
    rgba.set(src.subarray((ys * scan.width + xs0) * 4, (ys * scan.width + xs1) * 4), to * 4);
    mask.fill(1, to, to + (xs1 - xs0));
  }
  for (let i = 3; i < rgba.length; i += 4) rgba[i] = 255;
  return { rgba, mask };
}

function resampled(scan: RgbaImage, rect: PxRect, m: AffineMap): AlignedPatch {
  const rgba = new Uint8Array(rect.w * rect.h * 4);
  const mask = new Uint8Array(rect.w * rect.h);
  const src = scan.data, sw = scan.width, sh = scan.height;
  for (let row = 0; row < rect.h; row++) {
    const y = rect.y + row;
    let xs = m[0] * rect.x + m[1] * y + m[2];
    let ys = m[3] * rect.x + m[4] * y + m[5];
    for (let col = 0, o = row * rect.w * 4; col < rect.w; col++, o += 4, xs += m[0], ys += m[3]) {
      rgba[o + 3] = 255;
      if (xs < 0 || ys < 0 || xs > sw - 1 || ys > sh - 1) continue;
      const x0 = Math.min(sw - 2, xs | 0), y0 = Math.min(sh - 2, ys | 0);
      const fx = xs - x0, fy = ys - y0;
      const p = (y0 * sw + x0) * 4, q = p + sw * 4;
      const w00 = (1 - fx) * (1 - fy), w10 = fx * (1 - fy), w01 = (1 - fx) * fy, w11 = fx * fy;
      rgba[o] = src[p] * w00 + src[p + 4] * w10 + src[q] * w01 + src[q + 4] * w11 + 0.5;
      rgba[o + 1] = src[p + 1] * w00 + src[p + 5] * w10 + src[q + 1] * w01 + src[q + 5] * w11 + 0.5;
      rgba[o + 2] = src[p + 2] * w00 + src[p + 6] * w10 + src[q + 2] * w01 + src[q + 6] * w11 + 0.5;
      mask[row * rect.w + col] = 1;
    }
  }
  return { rgba, mask };
}
