// Defects planted in the press's separations before screening, with their truth in sheet mm: felt-tip dots,
// hickeys (an ink dot with a light ring), voids, streaks and scratches, and local colour shifts of a chosen
// ΔE00. Changed and missing text come from a second rendering (see case.ts).
import { deltaE00, linearRgbToLab } from "./colour";
import type { Separations } from "./ghostscript";
import { meanReflectance, type InkSet } from "./inks";
import type { BoxMm } from "./painter";
import type { Random } from "./random";

export type DefectKind = "extra_ink" | "missing_ink" | "colour_shift" | "changed_text" | "streak";

export interface PlantedDefect {
  kind: DefectKind;
  /** What was done, e.g. "felt-tip dot", "hickey", "void", "scratch", "ink streak", "colour patch". */
  cause: string;
  /** Bounding box in sheet mm (case.ts turns it into trim-box mm). */
  box: BoxMm;
  /** Area of the defect itself in mm² (a disc's area, a line's length × width). */
  areaMm2: number;
  /** Smallest dimension in mm (a dot's diameter, a line's width). */
  sizeMm: number;
  deltaE00?: number;
}

type Pixel = (o: number) => void;

function forDisc(sep: Separations, cx: number, cy: number, r: number, f: (o: number, d: number) => void): void {
  const k = sep.dpi / 25.4;
  const x0 = Math.max(0, Math.floor((cx - r) * k)), x1 = Math.min(sep.width - 1, Math.ceil((cx + r) * k));
  const y0 = Math.max(0, Math.floor((cy - r) * k)), y1 = Math.min(sep.height - 1, Math.ceil((cy + r) * k));
  for (let y = y0; y <= y1; y++) {
    for (let x = x0; x <= x1; x++) {
      const d = Math.hypot((x + 0.5) / k - cx, (y + 0.5) / k - cy);
      if (d <= r) f((y * sep.width + x) * 4, d);
    }
  }
}

function forLine(sep: Separations, x1: number, y1: number, x2: number, y2: number, halfWidth: number, f: Pixel): void {
  const k = sep.dpi / 25.4, len = Math.hypot(x2 - x1, y2 - y1), ux = (x2 - x1) / len, uy = (y2 - y1) / len;
  const xa = Math.max(0, Math.floor((Math.min(x1, x2) - halfWidth) * k)), xb = Math.min(sep.width - 1, Math.ceil((Math.max(x1, x2) + halfWidth) * k));
  const ya = Math.max(0, Math.floor((Math.min(y1, y2) - halfWidth) * k)), yb = Math.min(sep.height - 1, Math.ceil((Math.max(y1, y2) + halfWidth) * k));
  for (let y = ya; y <= yb; y++) {
    for (let x = xa; x <= xb; x++) {
      const px = (x + 0.5) / k - x1, py = (y + 0.5) / k - y1;
      const along = px * ux + py * uy, across = Math.abs(-px * uy + py * ux);
      if (along >= 0 && along <= len && across <= halfWidth) f((y * sep.width + x) * 4);
    }
  }
}

/** Mean ink (0–1 each) over a box, to place voids on ink and judge a colour shift. */
function meanInk(sep: Separations, box: BoxMm): number[] {
  const k = sep.dpi / 25.4, sums = [0, 0, 0, 0];
  let n = 0;
  const step = Math.max(1, Math.round(k * 0.2));
  for (let y = Math.floor(box.y * k); y < (box.y + box.h) * k; y += step) {
    for (let x = Math.floor(box.x * k); x < (box.x + box.w) * k; x += step) {
      if (x < 0 || y < 0 || x >= sep.width || y >= sep.height) continue;
      const o = (y * sep.width + x) * 4;
      for (let c = 0; c < 4; c++) sums[c] += sep.cmyk[o + c] / 255;
      n++;
    }
  }
  return sums.map((s) => s / Math.max(1, n));
}

const inside = (up: BoxMm, rng: Random, pad: number) => ({ x: up.x + pad + rng.next() * (up.w - 2 * pad), y: up.y + pad + rng.next() * (up.h - 2 * pad) });

export function plantDefect(sep: Separations, ups: BoxMm[], kind: Exclude<DefectKind, "changed_text">, rng: Random, inks: InkSet): PlantedDefect {
  const up = rng.pick(ups);
  if (kind === "extra_ink") {
    if (rng.chance(0.6)) {
      const d = rng.range(0.3, 2), { x, y } = inside(up, rng, 3);
      const marker = rng.pick([[0, 0, 0, 255], [255, 200, 0, 60], [0, 255, 230, 0]]);
      forDisc(sep, x, y, d / 2, (o) => { for (let c = 0; c < 4; c++) sep.cmyk[o + c] = Math.max(sep.cmyk[o + c], marker[c]); });
      return { kind, cause: "felt-tip dot", box: { x: x - d / 2, y: y - d / 2, w: d, h: d }, areaMm2: (Math.PI * d * d) / 4, sizeMm: d };
    }
    const core = rng.range(0.25, 0.6), ring = core * rng.range(1.8, 2.6), { x, y } = inside(up, rng, 4);
    const ink = rng.int(0, 3);
    forDisc(sep, x, y, ring, (o, dist) => {
      if (dist <= core) sep.cmyk[o + ink] = 255;
      else for (let c = 0; c < 4; c++) sep.cmyk[o + c] = Math.round(sep.cmyk[o + c] * 0.15);
    });
    return { kind, cause: "hickey", box: { x: x - ring, y: y - ring, w: 2 * ring, h: 2 * ring }, areaMm2: Math.PI * ring * ring, sizeMm: 2 * ring };
  }
  if (kind === "missing_ink") {
    for (let attempt = 0; ; attempt++) {
      const d = rng.range(0.5, 2), { x, y } = inside(rng.pick(ups), rng, 3);
      const box = { x: x - d / 2, y: y - d / 2, w: d, h: d };
      const ink = meanInk(sep, { x: box.x - 1, y: box.y - 1, w: d + 2, h: d + 2 });
      if (ink.reduce((a, b) => a + b) < 0.7 && attempt < 200) continue;
      forDisc(sep, x, y, d / 2, (o) => { for (let c = 0; c < 4; c++) sep.cmyk[o + c] = 0; });
      return { kind, cause: "void", box, areaMm2: (Math.PI * d * d) / 4, sizeMm: d };
    }
  }
  if (kind === "streak") {
    const width = rng.range(0.15, 0.4), len = rng.range(8, 40), vertical = rng.chance(0.5);
    const { x, y } = inside(up, rng, 2);
    const x2 = vertical ? x + rng.range(-0.5, 0.5) : Math.min(up.x + up.w - 1, x + len);
    const y2 = vertical ? Math.min(up.y + up.h - 1, y + len) : y + rng.range(-0.5, 0.5);
    const scratch = rng.chance(0.4);
    const k = rng.range(0.55, 1) * 255;
    forLine(sep, x, y, x2, y2, width / 2, (o) => {
      if (scratch) for (let c = 0; c < 4; c++) sep.cmyk[o + c] = Math.round(sep.cmyk[o + c] * 0.1);
      else sep.cmyk[o + 3] = Math.max(sep.cmyk[o + 3], k);
    });
    const box = { x: Math.min(x, x2) - width / 2, y: Math.min(y, y2) - width / 2, w: Math.abs(x2 - x) + width, h: Math.abs(y2 - y) + width };
    return { kind, cause: scratch ? "scratch" : "ink streak", box, areaMm2: Math.hypot(x2 - x, y2 - y) * width, sizeMm: width };
  }
  // Colour shift: one ink's tone moved in a patch until the patch's mean colour is the target ΔE00 away.
  const target = rng.range(4, 12);
  for (let attempt = 0; ; attempt++) {
    const w = rng.range(3, 10), h = rng.range(3, 10), { x, y } = inside(rng.pick(ups), rng, 6);
    const box = { x: x - w / 2, y: y - h / 2, w, h };
    const before = meanInk(sep, box);
    const ink = rng.int(0, 3);
    const lab0 = linearRgbToLab(...meanReflectance(inks, before.map((a) => inks.gain[Math.round(a * 255)] / 255)));
    const dE = (delta: number) => {
      const after = before.map((a, c) => (c === ink ? Math.min(1, Math.max(0, a + delta)) : a));
      return deltaE00(lab0, linearRgbToLab(...meanReflectance(inks, after.map((a) => inks.gain[Math.round(a * 255)] / 255))));
    };
    const sign = before[ink] > 0.6 ? -1 : before[ink] < 0.2 ? 1 : rng.chance(0.5) ? 1 : -1;
    let lo = 0, hi = sign > 0 ? 1 - before[ink] : before[ink];
    if (dE(sign * hi) < target) {
      if (attempt < 100) continue;
    }
    for (let i = 0; i < 30; i++) {
      const mid = (lo + hi) / 2;
      if (dE(sign * mid) < target) lo = mid;
      else hi = mid;
    }
    const delta = sign * hi;
    const k = sep.dpi / 25.4;
    for (let py = Math.max(0, Math.floor(box.y * k)); py < Math.min(sep.height, (box.y + h) * k); py++) {
      for (let px = Math.max(0, Math.floor(box.x * k)); px < Math.min(sep.width, (box.x + w) * k); px++) {
        const o = (py * sep.width + px) * 4 + ink;
        sep.cmyk[o] = Math.min(255, Math.max(0, Math.round(sep.cmyk[o] + delta * 255)));
      }
    }
    return { kind: "colour_shift", cause: "colour patch", box, areaMm2: w * h, sizeMm: Math.min(w, h), deltaE00: Math.round(dE(delta) * 100) / 100 };
  }
}
