// Excluded areas drawn with the pointer: screen px → page mm and a drag → an area of the sheet or of one up.
// The picture is the page stretched over its box (an SVG viewBox "0 0 W H" with preserveAspectRatio="none": W3C
// SVG 1.1, 7.7 "The viewBox attribute" and 7.8 "preserveAspectRatio"), so mm = (px − box origin) × W / box width
// on x, and likewise on y. The worked numbers below follow from that by hand.
import { describe, expect, it } from "vitest";
import { drawnArea, pointerToMm } from "@/lib/pipeline/draw-area";

// A 210 × 148 mm sheet (A5 landscape, ISO 216) with 1 × 2 ups, shown 840 × 592 px at (100, 50) on screen: 4 px/mm.
const page = { widthMm: 210, heightMm: 148 };
const box = { left: 100, top: 50, width: 840, height: 592 };
const ups = { rows: 1, columns: 2 };

describe("drawing excluded areas", () => {
  it("converts a pointer position to mm on the page", () => {
    expect(pointerToMm(100, 50, box, page)).toEqual({ x: 0, y: 0 });
    expect(pointerToMm(940, 642, box, page)).toEqual({ x: 210, y: 148 });
    expect(pointerToMm(520, 346, box, page)).toEqual({ x: 105, y: 74 });
    // 181 px right of the box edge at 4 px/mm is 45.25 mm.
    expect(pointerToMm(281, 50, box, page).x).toBeCloseTo(45.25, 10);
  });

  it("scales each axis on its own when the box is not the page's shape", () => {
    expect(pointerToMm(100 + 420, 50 + 100, { ...box, height: 200 }, page)).toEqual({ x: 105, y: 74 });
  });

  it("keeps a pointer dragged past the picture on the page", () => {
    expect(pointerToMm(0, 10_000, box, page)).toEqual({ x: 0, y: 148 });
  });

  it("a sheet area is the dragged rectangle from the page's top-left, whichever corner came first, to 0.1 mm", () => {
    expect(drawnArea({ x: 50.04, y: 30 }, { x: 20, y: 10.96 }, "sheet", ups, page)).toEqual({ scope: "sheet", label: "", x: 20, y: 11, w: 30, h: 19 });
  });

  it("an up area is measured from the up it was started in and cut to that up", () => {
    // Up 2 spans x 105–210 mm: a drag from (120, 20) to (230, 40) becomes x 15, w 90 inside that up.
    expect(drawnArea({ x: 120, y: 20 }, { x: 230, y: 40 }, "up", ups, page)).toEqual({ scope: "up", label: "", x: 15, y: 20, w: 90, h: 20 });
    expect(drawnArea({ x: 10, y: 5 }, { x: 30, y: 13 }, "up", ups, page)).toEqual({ scope: "up", label: "", x: 10, y: 5, w: 20, h: 8 });
  });

  it("an up area started outside the ups is a sheet area", () => {
    const withMargin = { rows: 1, columns: 2, areaMm: { x: 10, y: 10, w: 190, h: 128 } };
    expect(drawnArea({ x: 2, y: 2 }, { x: 8, y: 8 }, "up", withMargin, page)?.scope).toBe("sheet");
  });

  it("a click or a tremor (under 0.5 mm either way) draws nothing", () => {
    expect(drawnArea({ x: 10, y: 10 }, { x: 10.2, y: 30 }, "sheet", ups, page)).toBeNull();
    expect(drawnArea({ x: 10, y: 10 }, { x: 10, y: 10 }, "up", ups, page)).toBeNull();
  });
});
