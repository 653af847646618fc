// Pixel-grid helpers shared by the stages: rectangles in pixels and mm ↔ px.
import type { RectMm } from "./types";

/** A rectangle of whole pixels: columns x … x + w − 1, rows y … y + h − 1. */
export interface PxRect {
  x: number;
  y: number;
  w: number;
  h: number;
}

export function mmToPx(mm: number, dpi: number): number {
  return (mm * dpi) / 25.4;
}

export function pxToMm(px: number, dpi: number): number {
  return (px * 25.4) / dpi;
}

/** A pixel rectangle (fractional allowed) in mm. */
export function pxRectToMm(r: PxRect, dpi: number): RectMm {
  return { x: pxToMm(r.x, dpi), y: pxToMm(r.y, dpi), w: pxToMm(r.w, dpi), h: pxToMm(r.h, dpi) };
}

/** Whole pixels covered by a mm rectangle (rounded outwards), clipped to the image. */
export function rectMmToPx(r: RectMm, dpi: number, width: number, height: number): PxRect {
  const x0 = Math.max(0, Math.floor(mmToPx(r.x, dpi)));
  const y0 = Math.max(0, Math.floor(mmToPx(r.y, dpi)));
  const x1 = Math.min(width, Math.ceil(mmToPx(r.x + r.w, dpi)));
  const y1 = Math.min(height, Math.ceil(mmToPx(r.y + r.h, dpi)));
  return { x: x0, y: y0, w: Math.max(0, x1 - x0), h: Math.max(0, y1 - y0) };
}

/** Whole pixels lying fully inside a mm rectangle (rounded inwards), clipped to the image. */
export function rectMmToPxInside(r: RectMm, dpi: number, width: number, height: number): PxRect {
  const x0 = Math.max(0, Math.ceil(mmToPx(r.x, dpi)));
  const y0 = Math.max(0, Math.ceil(mmToPx(r.y, dpi)));
  const x1 = Math.min(width, Math.floor(mmToPx(r.x + r.w, dpi)));
  const y1 = Math.min(height, Math.floor(mmToPx(r.y + r.h, dpi)));
  return { x: x0, y: y0, w: Math.max(0, x1 - x0), h: Math.max(0, y1 - y0) };
}

export function intersect(a: PxRect, b: PxRect): PxRect {
  const x0 = Math.max(a.x, b.x), y0 = Math.max(a.y, b.y);
  const x1 = Math.min(a.x + a.w, b.x + b.w), y1 = Math.min(a.y + a.h, b.y + b.h);
  return { x: x0, y: y0, w: Math.max(0, x1 - x0), h: Math.max(0, y1 - y0) };
}

/** RGB (3 bytes a pixel) of RGBA pixels, alpha dropped. */
export function rgbaToRgb(rgba: Uint8Array | Uint8ClampedArray): Uint8Array {
  const n = rgba.length / 4, out = new Uint8Array(n * 3);
  for (let i = 0, p = 0, q = 0; i < n; i++, p += 4, q += 3) {
    out[q] = rgba[p];
    out[q + 1] = rgba[p + 1];
    out[q + 2] = rgba[p + 2];
  }
  return out;
}

/** RGBA (alpha 255) of RGB pixels. */
export function rgbToRgba(rgb: Uint8Array): Uint8Array {
  const n = rgb.length / 3, out = new Uint8Array(n * 4);
  for (let i = 0, p = 0, q = 0; i < n; i++, p += 4, q += 3) {
    out[p] = rgb[q];
    out[p + 1] = rgb[q + 1];
    out[p + 2] = rgb[q + 2];
    out[p + 3] = 255;
  }
  return out;
}

/** Copies a rectangle of an RGBA image into a new buffer (no bounds growth: the rectangle must fit). */
export function cropRgba(data: Uint8Array | Uint8ClampedArray, width: number, r: PxRect): Uint8Array {
  const out = new Uint8Array(r.w * r.h * 4);
  for (let row = 0; row < r.h; row++) {
    const from = ((r.y + row) * width + r.x) * 4;
    out.set(data.subarray(from, from + r.w * 4), row * r.w * 4);
  }
  return out;
}
