// Excluded areas drawn with the pointer on the page picture: screen pixels to millimetres on the page (the
// picture shows the whole page stretched to its box, so the scale is the page size over the box size on each
// axis), and a dragged rectangle to an area of the sheet or of the up it was started in.
import type { ExcludedArea, RectMm } from "../../db/schema";
import type { UpsLayout } from "../imaging/types";
import { upRect } from "./excluded-areas";

export interface Page {
  widthMm: number;
  heightMm: number;
}

/** Where the picture sits on screen (getBoundingClientRect of the drawing surface). */
export interface Box {
  left: number;
  top: number;
  width: number;
  height: number;
}

const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v));
const tenth = (v: number) => Math.round(v * 10) / 10;

/** The page point in mm under a pointer at (clientX, clientY), kept on the page. */
export function pointerToMm(clientX: number, clientY: number, box: Box, page: Page): { x: number; y: number } {
  return {
    x: clamp(((clientX - box.left) / box.width) * page.widthMm, 0, page.widthMm),
    y: clamp(((clientY - box.top) / box.height) * page.heightMm, 0, page.heightMm),
  };
}

/** The rectangle spanned by two page points, in mm (either corner first). */
export function spanned(a: { x: number; y: number }, b: { x: number; y: number }): RectMm {
  return { x: Math.min(a.x, b.x), y: Math.min(a.y, b.y), w: Math.abs(a.x - b.x), h: Math.abs(a.y - b.y) };
}

/** Drags smaller than this (a click, a tremor) make no area; the route refuses less than 0.5 mm too. */
export const MIN_DRAWN_MM = 0.5;

/**
 * The excluded area a drag from `start` to `end` (page mm) makes, rounded to 0.1 mm. "sheet": from the page's
 * top-left. "up": cut to the up the drag started in and measured from that up's top-left, so it repeats in
 * every up; a drag started outside every up makes a sheet area. Null when the drag was too small.
 */
export function drawnArea(start: { x: number; y: number }, end: { x: number; y: number }, scope: ExcludedArea["scope"], ups: UpsLayout, page: Page): ExcludedArea | null {
  let rect = spanned(start, end);
  let kind = scope;
  if (scope === "up") {
    const cell = upContaining(start, ups, page);
    if (cell) {
      const x0 = clamp(rect.x, cell.x, cell.x + cell.w);
      const y0 = clamp(rect.y, cell.y, cell.y + cell.h);
      const x1 = clamp(rect.x + rect.w, cell.x, cell.x + cell.w);
      const y1 = clamp(rect.y + rect.h, cell.y, cell.y + cell.h);
      rect = { x: x0 - cell.x, y: y0 - cell.y, w: x1 - x0, h: y1 - y0 };
    } else kind = "sheet";
  }
  const area = { scope: kind, label: "", x: tenth(rect.x), y: tenth(rect.y), w: tenth(rect.w), h: tenth(rect.h) };
  return area.w >= MIN_DRAWN_MM && area.h >= MIN_DRAWN_MM ? area : null;
}

function upContaining(point: { x: number; y: number }, ups: UpsLayout, page: Page): RectMm | null {
  for (let row = 0; row < ups.rows; row++) {
    for (let column = 0; column < ups.columns; column++) {
      const cell = upRect(ups, page, row, column);
      if (point.x >= cell.x && point.x <= cell.x + cell.w && point.y >= cell.y && point.y <= cell.y + cell.h) return cell;
    }
  }
  return null;
}
