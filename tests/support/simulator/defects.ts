// Print defects planted at known places (mm, artwork page coordinates) on the printed sheet, before it is
// scanned: dots of dark ink (a felt-tip mark of 0.3–2 mm on one sheet of a long run must be found — common
// practice, no published source), voids (hickeys: paper showing through a solid), scratches (a thin light line
// across a solid) and a colour-shifted patch. The changed word comes from rendering a second artwork PDF.
import { D65_WHITE, linearToSrgb, srgb8ToLab } from "@/lib/imaging/colour/colour";
import type { FindingKind, RectMm, RgbaImage } from "@/lib/imaging/types";

export type DefectSpec =
  | { type: "dot"; xMm: number; yMm: number; diameterMm: number; rgb?: [number, number, number] }
  | { type: "void"; xMm: number; yMm: number; diameterMm: number }
  | { type: "scratch"; x0Mm: number; y0Mm: number; x1Mm: number; y1Mm: number; widthMm: number }
  /** A patch whose colour turns by `hueDeg` in CIELAB at the same lightness and chroma (e.g. one ink's share). */
  | { type: "colour_shift"; rectMm: RectMm; hueDeg: number };

export interface DefectTruth {
  type: DefectSpec["type"] | "changed_word";
  boxMm: RectMm;
  /** The finding kind expected, or null where either reading is fair (a changed word adds and removes ink). */
  kind: FindingKind | null;
}

/** Felt-tip marker ink, a dark blue-black (invented). */
const PEN_INK: [number, number, number] = [40, 45, 95];

/** Draws every defect into the printed sheet in place; returns the truth boxes. */
export function applyDefects(img: RgbaImage & { dpi: number }, defects: DefectSpec[]): DefectTruth[] {
  const px = (mm: number) => (mm * img.dpi) / 25.4;
  const truths: DefectTruth[] = [];
  for (const d of defects) {
    if (d.type === "dot" || d.type === "void") {
      const cx = px(d.xMm), cy = px(d.yMm), r = px(d.diameterMm / 2);
      const ink = d.type === "dot" ? (d.rgb ?? PEN_INK) : null;
      paint(img, cx - r - 1, cy - r - 1, cx + r + 1, cy + r + 1, (x, y) => r + 0.5 - Math.hypot(x + 0.5 - cx, y + 0.5 - cy), (v, c, cov) =>
        ink ? v * (1 - cov + (cov * ink[c]) / 255) : v + (255 - v) * cov,
      );
      truths.push({ type: d.type, boxMm: { x: d.xMm - d.diameterMm / 2, y: d.yMm - d.diameterMm / 2, w: d.diameterMm, h: d.diameterMm }, kind: ink ? "extra_ink" : "missing_ink" });
    } else if (d.type === "scratch") {
      const x0 = px(d.x0Mm), y0 = px(d.y0Mm), x1 = px(d.x1Mm), y1 = px(d.y1Mm), half = px(d.widthMm / 2);
      const len = Math.hypot(x1 - x0, y1 - y0), ux = (x1 - x0) / len, uy = (y1 - y0) / len;
      const dist = (x: number, y: number) => {
        const t = Math.min(len, Math.max(0, (x + 0.5 - x0) * ux + (y + 0.5 - y0) * uy));
        return Math.hypot(x + 0.5 - (x0 + t * ux), y + 0.5 - (y0 + t * uy));
      };
      paint(img, Math.min(x0, x1) - half - 1, Math.min(y0, y1) - half - 1, Math.max(x0, x1) + half + 1, Math.max(y0, y1) + half + 1,
        (x, y) => half + 0.5 - dist(x, y), (v, _c, cov) => v + (255 - v) * 0.85 * cov);
      const m = d.widthMm / 2;
      truths.push({ type: "scratch", boxMm: { x: Math.min(d.x0Mm, d.x1Mm) - m, y: Math.min(d.y0Mm, d.y1Mm) - m, w: Math.abs(d.x1Mm - d.x0Mm) + 2 * m, h: Math.abs(d.y1Mm - d.y0Mm) + 2 * m }, kind: "streak" });
    } else {
      const r = d.rectMm, soft = px(0.3);
      const x0 = px(r.x), y0 = px(r.y), x1 = px(r.x + r.w), y1 = px(r.y + r.h);
      const turned = new Map<number, [number, number, number]>();
      const turn = (p: number): [number, number, number] => {
        const key = (img.data[p] << 16) | (img.data[p + 1] << 8) | img.data[p + 2];
        let t = turned.get(key);
        if (!t) turned.set(key, (t = turnHue(img.data[p], img.data[p + 1], img.data[p + 2], d.hueDeg)));
        return t;
      };
      paintPixels(img, x0, y0, x1, y1, (x, y) => Math.min(x + 0.5 - x0, x1 - x - 0.5, y + 0.5 - y0, y1 - y - 0.5) / soft + 0.5, (p, cov) => {
        const t = turn(p);
        for (let c = 0; c < 3; c++) img.data[p + c] = Math.round(img.data[p + c] + (t[c] - img.data[p + c]) * cov);
      });
      truths.push({ type: "colour_shift", boxMm: { ...r }, kind: "colour_shift" });
    }
  }
  return truths;
}

/** sRGB 8-bit turned by `deg` of CIELAB hue (D65), lightness and chroma kept; clipped to the sRGB gamut. */
function turnHue(r: number, g: number, b: number, deg: number): [number, number, number] {
  const [l, a, bb] = srgb8ToLab(r, g, b);
  const t = (deg * Math.PI) / 180;
  const a2 = a * Math.cos(t) - bb * Math.sin(t), b2 = a * Math.sin(t) + bb * Math.cos(t);
  // Inverse of CIE 15:2004 Lab, then XYZ → linear sRGB (inverse of the sRGB matrix), then the transfer curve.
  const fy = (l + 16) / 116, fx = fy + a2 / 500, fz = fy - b2 / 200;
  const inv = (f: number) => (f > 6 / 29 ? f ** 3 : 3 * (6 / 29) ** 2 * (f - 4 / 29));
  const [x, y, z] = [inv(fx) * D65_WHITE[0], inv(fy) * D65_WHITE[1], inv(fz) * D65_WHITE[2]];
  const rl = 3.2404542 * x - 1.5371385 * y - 0.4985314 * z;
  const gl = -0.969266 * x + 1.8760108 * y + 0.041556 * z;
  const bl = 0.0556434 * x - 0.2040259 * y + 1.0572252 * z;
  return [rl, gl, bl].map((v) => Math.round(255 * linearToSrgb(Math.min(1, Math.max(0, v))))) as [number, number, number];
}

/** Calls `blend` for every channel of every pixel in the box whose coverage (clamped 0–1) is above zero. */
function paintPixels(
  img: RgbaImage,
  bx0: number, by0: number, bx1: number, by1: number,
  coverage: (x: number, y: number) => number,
  apply: (p: number, cov: number) => void,
): void {
  const xa = Math.max(0, Math.floor(bx0)), ya = Math.max(0, Math.floor(by0));
  const xb = Math.min(img.width - 1, Math.ceil(bx1)), yb = Math.min(img.height - 1, Math.ceil(by1));
  for (let y = ya; y <= yb; y++) {
    for (let x = xa; x <= xb; x++) {
      const cov = Math.min(1, Math.max(0, coverage(x, y)));
      if (cov > 0) apply((y * img.width + x) * 4, cov);
    }
  }
}

function paint(
  img: RgbaImage,
  bx0: number, by0: number, bx1: number, by1: number,
  coverage: (x: number, y: number) => number,
  blend: (value: number, channel: number, cov: number) => number,
): void {
  const xa = Math.max(0, Math.floor(bx0)), ya = Math.max(0, Math.floor(by0));
  const xb = Math.min(img.width - 1, Math.ceil(bx1)), yb = Math.min(img.height - 1, Math.ceil(by1));
  for (let y = ya; y <= yb; y++) {
    for (let x = xa; x <= xb; x++) {
      const cov = Math.min(1, Math.max(0, coverage(x, y)));
      if (cov <= 0) continue;
      const p = (y * img.width + x) * 4;
      for (let c = 0; c < 3; c++) img.data[p + c] = Math.min(255, Math.max(0, Math.round(blend(img.data[p + c], c, cov))));
    }
  }
}
