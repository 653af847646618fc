// Page millimetres to OpenSeadragon viewport units: the tiles cover the artwork page exactly, and a viewport is
// 1 unit wide across the image, so x and y both divide by the page width.
import type { SheetView } from "@/lib/review/sheet";

export interface BoxMm {
  x: number;
  y: number;
  w: number;
  h: number;
}

export const toViewport = (b: BoxMm, pageWidthMm: number) => ({
  x: b.x / pageWidthMm,
  y: b.y / pageWidthMm,
  w: b.w / pageWidthMm,
  h: b.h / pageWidthMm,
});

/** The boxes of the up grid, numbered row by row as the engine numbers ups. */
export function upBoxes(ups: SheetView["ups"]): (BoxMm & { number: number })[] {
  const out: (BoxMm & { number: number })[] = [];
  const w = ups.areaMm.w / ups.columns, h = ups.areaMm.h / ups.rows;
  for (let r = 0; r < ups.rows; r++)
    for (let c = 0; c < ups.columns; c++) out.push({ number: r * ups.columns + c + 1, x: ups.areaMm.x + c * w, y: ups.areaMm.y + r * h, w, h });
  return out;
}

/** A view around a finding: the box with a margin, at least 12 mm across so small marks keep their context. */
export function zoomBox(f: BoxMm): BoxMm {
  const size = Math.max(12, f.w * 3, f.h * 3);
  return { x: f.x + f.w / 2 - size / 2, y: f.y + f.h / 2 - size / 2, w: size, h: size };
}

/** A scale-bar length (mm) from 1-2-5 steps that draws between about 60 and 150 screen pixels. */
export function scaleBarMm(pixelsPerMm: number): number {
  const steps = [0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500, 1000];
  return steps.find((mm) => mm * pixelsPerMm >= 60) ?? steps[steps.length - 1];
}
