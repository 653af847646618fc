// The comparison on small hand-made pairs. External reference: colorjs.io (Lea Verou & Chris Lilley) for
// sRGB → CIELAB (D65); ΔE00 itself is checked against Sharma, Wu & Dalal (2005) in colour.test.ts.
import Color from "colorjs.io";
import { describe, expect, it } from "vitest";
import { deltaE00 } from "@/lib/imaging/colour/colour";
import { compareBand, CompareScratch, PIXEL_COLOUR_SHIFT, PIXEL_EXTRA_INK, PIXEL_MISSING_INK, type BandPair } from "@/lib/imaging/compare/compare";
import { lowPass } from "@/lib/imaging/colour/normalise";
import { prepareLowPassed } from "@/lib/imaging/compare/prepared";

const W = 40, H = 30;

function image(paint: (x: number, y: number) => [number, number, number]): Uint8Array {
  const out = new Uint8Array(W * H * 4);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
    const [r, g, b] = paint(x, y);
    out.set([r, g, b, 255], (y * W + x) * 4);
  }
  return out;
}

function pair(art: Uint8Array, scan: Uint8Array): BandPair {
  const prepared = prepareLowPassed(art, { x: 0, y: 0, w: W, h: H }, { opticalBlurPx: 0, sigmaPx: 1.2, radiusPx: 1, reachPx: 4 });
  return { width: W, rows: H, art: prepared, scan, coreY: 0, coreRows: H, inspect: new Uint8Array(W * H).fill(1) };
}

const settings = { lowDeltaE00: 2, peakDeltaE00: 4, radiusPx: 1 };

describe("compareBand", () => {
  it("flags nothing on identical images (pixelmatch's fast path)", () => {
    const a = image((x) => (x < 20 ? [0, 0, 0] : [255, 255, 255]));
    const d = compareBand(pair(a, new Uint8Array(a)), settings, new CompareScratch());
    expect(d.flagged).toBe(0);
    expect(d.candidates).toBe(0);
  });

  it("measures a flat difference as ΔE00 of the two colours' CIELAB (D65) from colorjs.io", () => {
    const art: [number, number, number] = [200, 100, 50], scan: [number, number, number] = [190, 110, 62];
    const d = compareBand(pair(image(() => art), image(() => scan)), settings, new CompareScratch());
    const lab = (c: number[]) => new Color("srgb", c.map((v) => v / 255) as [number, number, number]).to("lab-d65").coords as number[];
    const [l1, a1, b1] = lab(art), [l2, a2, b2] = lab(scan);
    const expected = deltaE00(l1, a1, b1, l2, a2, b2);
    expect(d.flagged).toBe(W * H);
    expect(d.deltaE[W * 15 + 20]).toBeCloseTo(expected, 2);
  });

  it("forgives an edge moved by less than the registration radius but not by more", async () => {
    const edge = (at: number) => image((x) => (x < at ? [20, 20, 20] : [250, 250, 250]));
    const art = await lowPass(edge(20), W, H, 1.2);
    const near = compareBand(pair(art, await lowPass(edge(21), W, H, 1.2)), settings, new CompareScratch());
    expect(near.flagged).toBe(0);
    const far = compareBand(pair(art, await lowPass(edge(24), W, H, 1.2)), settings, new CompareScratch());
    expect(far.flagged).toBeGreaterThan(H);
    expect(far.kind[W * 15 + 22]).toBe(PIXEL_EXTRA_INK);
  });

  it("flags a thin stroke missing from the scan although paper lies within the radius", async () => {
    const art = await lowPass(image((x) => (x === 20 || x === 21 ? [30, 30, 30] : [250, 250, 250])), W, H, 1.2);
    const scan = await lowPass(image(() => [250, 250, 250]), W, H, 1.2);
    const d = compareBand(pair(art, scan), settings, new CompareScratch());
    expect(d.kind[W * 15 + 20]).toBe(PIXEL_MISSING_INK);
    expect(d.deltaE[W * 15 + 20]).toBeGreaterThan(10);
  });

  it("calls a hue change at the same lightness a colour shift", () => {
    const d = compareBand(pair(image(() => [40, 140, 160]), image(() => [40, 150, 130])), settings, new CompareScratch());
    expect(d.kind[W * 15 + 20]).toBe(PIXEL_COLOUR_SHIFT);
  });

  it("skips pixels outside the inspected area and refuses mismatched buffers", () => {
    const p = pair(image(() => [0, 0, 0]), image(() => [255, 255, 255]));
    p.inspect.fill(0, 0, W * 10);
    const d = compareBand(p, settings, new CompareScratch());
    expect(d.flagged).toBe(W * (H - 10));
    expect(() => compareBand({ ...p, rows: H + 1 }, settings, new CompareScratch())).toThrow(/do not match/);
  });

  it("gives the same difference with scratch buffers reused after other bands as with fresh ones", async () => {
    const art = image((x, y) => ((x + y) % 9 < 4 ? [30, 30, 30] : [240, 235, 225]));
    const scan = (dot: number) => image((x, y) => ((x - dot) ** 2 + (y - 15) ** 2 < 9 ? [20, 20, 120] : (x + y) % 9 < 4 ? [32, 30, 28] : [240, 236, 222]));
    const scratch = new CompareScratch();
    // Bands that flag many pixels (every pixel's result written) and few, in turn, through one scratch.
    compareBand(pair(image(() => [0, 0, 0]), image(() => [255, 255, 255])), settings, scratch);
    compareBand(pair(art, scan(10)), { ...settings, everyPixel: true }, scratch);
    for (const dot of [30, 10, 20]) {
      const a = compareBand(pair(art, scan(dot)), settings, scratch);
      const b = compareBand(pair(art, scan(dot)), settings, new CompareScratch());
      expect(a.flagged).toBeGreaterThan(0);
      expect(a.flagged).toBe(b.flagged);
      expect([...a.deltaE]).toEqual([...b.deltaE]);
      expect([...a.kind]).toEqual([...b.kind]);
      expect([...a.score]).toEqual([...b.score]);
      expect([...a.structural]).toEqual([...b.structural]);
    }
  });
});
