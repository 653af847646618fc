// Building blocks of the design templates: gradients, procedural pictures, reversed text, 6 pt small print,
// hairlines, tables and barcodes with digits. Positions in mm from the sheet's top-left.
import { ean13CheckDigit, ean13Modules } from "./barcode";
import type { Ink, Painter } from "./painter";
import type { Random } from "./random";

const mix = (a: Ink, b: Ink, t: number): Ink => [0, 1, 2, 3].map((i) => a[i] + (b[i] - a[i]) * t) as unknown as Ink;
const clamp01 = (v: number) => Math.min(1, Math.max(0, v));

/** A stepped gradient fine enough (0.4 mm steps) to print as a smooth one. */
export function gradient(p: Painter, x: number, y: number, w: number, h: number, from: Ink, to: Ink, vertical = false): void {
  const steps = Math.max(8, Math.round((vertical ? h : w) / 0.4));
  for (let i = 0; i < steps; i++) {
    const t = i / (steps - 1);
    if (vertical) p.rect(x, y + (h * i) / steps, w, h / steps + 0.05, mix(from, to, t));
    else p.rect(x + (w * i) / steps, y, w / steps + 0.05, h, mix(from, to, t));
  }
}

/** A landscape-like picture: sky gradient, a sun, hills, and a field of noisy cells (like photo grain). */
export function picture(p: Painter, x: number, y: number, w: number, h: number, rng: Random, sky: Ink, ground: Ink): void {
  gradient(p, x, y, w, h * 0.55, sky, mix(sky, [0, 0.1, 0.2, 0], 0.7), true);
  p.circle(x + w * rng.range(0.2, 0.8), y + h * rng.range(0.15, 0.3), Math.min(w, h) * 0.09, [0, 0.15, 0.85, 0]);
  const cell = Math.max(0.8, Math.min(w, h) / 40);
  const phase = rng.range(0, 6), freq = rng.range(1.5, 3.5);
  for (let cx = 0; cx < w - 1e-6; cx += cell) {
    const horizon = h * (0.45 + 0.12 * Math.sin(phase + (freq * cx) / w * Math.PI));
    for (let cy = horizon; cy < h - 1e-6; cy += cell) {
      const t = clamp01((cy - horizon) / (h - horizon) + 0.25 * (rng.next() - 0.5));
      const ink = mix(ground, [ground[0] * 0.6, ground[1] * 0.6, ground[2] * 0.7, clamp01(ground[3] + 0.35)], t);
      p.rect(x + cx, y + cy, Math.min(cell, w - cx) + 0.02, Math.min(cell, h - cy) + 0.02, ink);
    }
  }
}

/** A dark solid with light (reversed) text on it. */
export function reversed(p: Painter, x: number, y: number, w: number, h: number, solid: Ink, text: string, sizePt: number, light: Ink = [0, 0, 0, 0]): void {
  p.rect(x, y, w, h, solid);
  p.text(text, x + 2, y + h / 2 + (sizePt / 72) * 25.4 * 0.35, sizePt, light, p.fonts.bold);
}

const WORDS = "sugar water salt flour cocoa butter milk oats barley malt honey vanilla lemon extract citric acid natural flavouring may contain traces nuts store cool dry place best before see side".split(" ");

/** Lines of 6 pt small print from a word list, wrapped to the width; returns the height used in mm. */
export function smallPrint(p: Painter, x: number, y: number, w: number, lines: number, rng: Random, ink: Ink = [0, 0, 0, 1], sizePt = 6): number {
  const lead = (sizePt / 72) * 25.4 * 1.25;
  for (let l = 0; l < lines; l++) {
    let line = "";
    for (;;) {
      const next = (line ? line + " " : "") + rng.pick(WORDS);
      if (p.fonts.regular.widthOfTextAtSize(next, sizePt) / (72 / 25.4) > w) break;
      line = next;
    }
    p.text(line, x, y + lead * (l + 1), sizePt, ink);
  }
  return lead * lines;
}

/** A table with 0.25 pt hairline rules: label column and value column. */
export function table(p: Painter, x: number, y: number, w: number, rows: [string, string][], ink: Ink = [0, 0, 0, 1], sizePt = 6.5): number {
  const rowH = (sizePt / 72) * 25.4 * 1.7;
  p.frame(x, y, w, rowH * rows.length, ink, 0.5);
  rows.forEach(([label, value], i) => {
    const base = y + rowH * (i + 0.72);
    if (i > 0) p.line(x, y + rowH * i, x + w, y + rowH * i, ink, 0.25);
    p.text(label, x + 1, base, sizePt, ink, i === 0 ? p.fonts.bold : p.fonts.regular);
    const vw = p.fonts.regular.widthOfTextAtSize(value, sizePt) / (72 / 25.4);
    p.text(value, x + w - 1 - vw, base, sizePt, ink);
  });
  p.line(x + w * 0.62, y + rowH, x + w * 0.62, y + rowH * rows.length, ink, 0.2);
  return rowH * rows.length;
}

/** An EAN-13 barcode (0.33 mm modules, the nominal size) with its digits beneath, on a white quiet zone. */
export function barcode(p: Painter, x: number, y: number, first12: string, heightMm = 14, module = 0.33): { w: number; h: number } {
  const digits = first12 + ean13CheckDigit(first12);
  const modules = ean13Modules(digits);
  const w = (modules.length + 18) * module;
  p.rect(x, y, w, heightMm + 4, [0, 0, 0, 0]);
  const x0 = x + 9 * module;
  let run = 0;
  for (let i = 0; i <= modules.length; i++) {
    if (modules[i] === "1") run++;
    else if (run > 0) {
      p.rect(x0 + (i - run) * module, y + 0.5, run * module, heightMm, [0, 0, 0, 1]);
      run = 0;
    }
  }
  p.text(`${digits[0]}  ${digits.slice(1, 7)}  ${digits.slice(7)}`, x + 1, y + heightMm + 3.2, 8, [0, 0, 0, 1]);
  return { w, h: heightMm + 4 };
}
