// The colour model on hand-made sample pairs, checked in CIEDE2000 (CIE 142-2001; the implementation is checked
// against Sharma, Wu & Dalal's test pairs, 2005, in colour.test.ts). The "press" below is made up for the test:
// flat colours print true, while a light cyan tint (a sky gradient, present nowhere flat) prints duller.
import { describe, expect, it } from "vitest";
import { deltaE00, srgbToLab } from "@/lib/imaging/colour/colour";
import { evaluateModel, fitColourModel } from "@/lib/imaging/colour/colour-model";
import type { SamplePairs } from "@/lib/imaging/colour/samples";

type Rgb = [number, number, number];
const FLAT: Rgb[] = [[250, 250, 248], [20, 20, 22], [128, 128, 128], [30, 83, 46], [200, 40, 40], [240, 220, 60], [60, 60, 160]];
/** The sky: artwork colours along a gradient, and what the press makes of them. */
const sky = (t: number): Rgb => [140 + 30 * t, 214 + 6 * t, 240 - 7 * t];
const printed = (c: Rgb): Rgb => [c[0] + 38, c[1] - 24, c[2] - 28];

function pairs(withSmooth: boolean): SamplePairs {
  const flatArt: number[] = [], flatScan: number[] = [], smoothArt: number[] = [], smoothScan: number[] = [];
  FLAT.forEach((c) => { for (let k = 0; k < 200; k++) { flatArt.push(...c); flatScan.push(...c); } });
  if (withSmooth) for (let i = 0; i < 600; i++) { const c = sky((i % 60) / 59); smoothArt.push(...c); smoothScan.push(...printed(c)); }
  const all = [...flatArt, ...smoothArt], allScan = [...flatScan, ...smoothScan];
  return {
    flatArt: Float32Array.from(flatArt), flatScan: Float32Array.from(flatScan), flatPos: new Float32Array((flatArt.length / 3) * 2), flatCount: flatArt.length / 3,
    allArt: Float32Array.from(all), allScan: Float32Array.from(allScan), allCount: all.length / 3,
    smoothArt: Float32Array.from(smoothArt), smoothScan: Float32Array.from(smoothScan), smoothCount: smoothArt.length / 3,
  };
}

const de = (a: Rgb, b: number[]) => deltaE00(...srgbToLab(a[0] / 255, a[1] / 255, a[2] / 255), ...srgbToLab(b[0] / 255, b[1] / 255, b[2] / 255));

describe("colour model", () => {
  it("learns a gradient's colours that no flat area has, and leaves a nearby grey alone", () => {
    const without = fitColourModel(pairs(false)), withSmooth = fitColourModel(pairs(true));
    for (const t of [0, 0.5, 1]) {
      const art = sky(t), scan = printed(art);
      expect(de(art, evaluateModel(without, ...scan))).toBeGreaterThan(8); // the hole: guessed from the flat colours
      expect(de(art, evaluateModel(withSmooth, ...scan))).toBeLessThan(1.5);
    }
    // A grey that prints true and scans 15–20 codes from the sky's print (a barcode's bars at 100 dpi): moved
    // by less than 3, the table's nodes being 8 codes apart (a correction reaches the cells next to its own).
    const grey: Rgb = [194, 191, 185];
    expect(de(grey, evaluateModel(without, ...grey))).toBeLessThan(0.5);
    expect(de(grey, evaluateModel(withSmooth, ...grey))).toBeLessThan(3);
    for (const c of FLAT) expect(de(c, evaluateModel(withSmooth, ...c))).toBeLessThan(1);
  });
});
