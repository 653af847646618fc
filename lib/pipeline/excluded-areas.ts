// Excluded areas of an artwork revision: rectangles in mm where variable data is printed (lot, expiry, sheet
// numbers, codes added later), so the engine reports nothing there. "sheet" areas are measured from the page's
// top-left; "up" areas from each up's top-left and repeated in every up of the revision's grid.
import { z } from "zod";
import type { ExcludedArea, RectMm } from "../../db/schema";
import type { UpsLayout } from "../imaging/types";

export const MAX_EXCLUDED_AREAS = 50;

const mm = (label: string) => z.number({ error: `${label} must be a number of millimetres.` }).finite().min(0, { error: `${label} must not be negative.` }).max(5000);

export const excludedAreaSchema = z.object({
  scope: z.enum(["sheet", "up"], { error: "Choose whether the area is on the sheet or in every up." }),
  label: z.string().trim().max(60, { error: "A label must be at most 60 characters." }).default(""),
  x: mm("Left"),
  y: mm("Top"),
  w: mm("Width").refine((v) => v >= 0.5, { error: "An area must be at least 0.5 mm wide." }),
  h: mm("Height").refine((v) => v >= 0.5, { error: "An area must be at least 0.5 mm high." }),
});

export const excludedAreasInput = z.object({
  areas: z.array(excludedAreaSchema).max(MAX_EXCLUDED_AREAS, { error: `At most ${MAX_EXCLUDED_AREAS} excluded areas.` }),
});

/** The stored rectangle the ups occupy, in mm; null means the whole page. */
export function upsAreaOf(r: { upsAreaXUm: number | null; upsAreaYUm: number | null; upsAreaWUm: number | null; upsAreaHUm: number | null }): RectMm | null {
  return r.upsAreaWUm && r.upsAreaHUm ? { x: (r.upsAreaXUm ?? 0) / 1000, y: (r.upsAreaYUm ?? 0) / 1000, w: r.upsAreaWUm / 1000, h: r.upsAreaHUm / 1000 } : null;
}

const round3 = (v: number) => Math.round(v * 1000) / 1000;

/** The rectangle one up occupies on the page (row and column from 0). */
export function upRect(ups: UpsLayout, page: { widthMm: number; heightMm: number }, row: number, column: number): RectMm {
  const area = ups.areaMm ?? { x: 0, y: 0, w: page.widthMm, h: page.heightMm };
  const w = area.w / ups.columns;
  const h = area.h / ups.rows;
  return { x: area.x + column * w, y: area.y + row * h, w, h };
}

/** Every excluded area as page rectangles in mm: an "up" area once per up of the grid, row by row. */
export function expandExcludedAreas(areas: readonly ExcludedArea[], ups: UpsLayout, page: { widthMm: number; heightMm: number }): RectMm[] {
  const out: RectMm[] = [];
  for (const a of areas) {
    if (a.scope === "sheet") {
      out.push({ x: a.x, y: a.y, w: a.w, h: a.h });
      continue;
    }
    for (let row = 0; row < Math.max(1, ups.rows); row++) {
      for (let column = 0; column < Math.max(1, ups.columns); column++) {
        const cell = upRect({ ...ups, rows: Math.max(1, ups.rows), columns: Math.max(1, ups.columns) }, page, row, column);
        out.push({ x: round3(cell.x + a.x), y: round3(cell.y + a.y), w: a.w, h: a.h });
      }
    }
  }
  return out;
}

/** Why an area does not fit its page or up, or null when it fits. */
export function areaOutOfBounds(area: ExcludedArea, ups: UpsLayout, page: { widthMm: number; heightMm: number }): string | null {
  const bounds = area.scope === "sheet" ? { w: page.widthMm, h: page.heightMm } : upRect(ups, page, 0, 0);
  const where = area.scope === "sheet" ? `the page (${round3(bounds.w)} × ${round3(bounds.h)} mm)` : `one up (${round3(bounds.w)} × ${round3(bounds.h)} mm)`;
  const slack = 0.01;
  if (area.x + area.w > bounds.w + slack || area.y + area.h > bounds.h + slack) return `The area reaches outside ${where}.`;
  return null;
}
