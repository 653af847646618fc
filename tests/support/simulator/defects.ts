// Print defects planted at known places (mm, artwork page coordinates) on the printed sheet, before it is
// scanned: dots of dark ink (a felt-tip mark of 0.3–2 mm on one sheet of a long run must be found — common
// practice, no published source), voids (hickeys: paper showing through a solid), scratches (a thin light line
// across a solid) and a colour-shifted patch. The changed word comes from rendering a second artwork PDF.
import type { FindingKind, RectMm, RgbaImage } from "@/lib/imaging/types";

export type DefectSpec =
  | { type: "dot"; xMm: number; yMm: number; diameterMm: number; rgb?: [number, number, number] }
  | { type: "void"; xMm: number; yMm: number; diameterMm: number }
  | { type: "scratch"; x0Mm: number; y0Mm: number; x1Mm: number; y1Mm: number; widthMm: number }
  | { type: "colour_shift"; rectMm: RectMm; inkGain: [number, number, number] };

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
      truths.push({ type: "scratch", boxMm: { x: Math.min(d.x0Mm, d.x1Mm) - m, y: Math.min(d.y0Mm, d.y1Mm) - m, w: Math.abs(d.x1Mm - d.x0Mm) + 2 * m, h: Math.abs(d.y1Mm - d.y0Mm) + 2 * m }, kind: "missing_ink" });
    } else {
      const r = d.rectMm, soft = px(0.3);
      const x0 = px(r.x), y0 = px(r.y), x1 = px(r.x + r.w), y1 = px(r.y + r.h);
      paint(img, x0, y0, x1, y1, (x, y) => Math.min(x + 0.5 - x0, x1 - x - 0.5, y + 0.5 - y0, y1 - y - 0.5) / soft + 0.5, (v, c, cov) =>
        255 - (255 - v) * (1 + (d.inkGain[c] - 1) * cov),
      );
      truths.push({ type: "colour_shift", boxMm: { ...r }, kind: "colour_shift" });
    }
  }
  return truths;
}

/** Calls `blend` for every channel of every pixel in the box whose coverage (clamped 0–1) is above zero. */
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
