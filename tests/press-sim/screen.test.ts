// The press simulator's screens, inks and colour maths against outside facts.
import { describe, expect, it } from "vitest";
import { ean13CheckDigit, ean13Modules } from "../support/press-sim/barcode";
import { deltaE00 } from "../support/press-sim/colour";
import { inked, PROCESS_ANGLES, screenBasis } from "../support/press-sim/halftone";
import { inkSet } from "../support/press-sim/inks";

/** Ink (1) or not (0) on an n × n grid of `pitch` mm for a flat tint. */
function tint(lpi: number, angleDeg: number, area: number, n: number, pitch: number): Float64Array {
  const basis = screenBasis({ lpi, angleDeg });
  const out = new Float64Array(n * n);
  for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) out[j * n + i] = inked(basis, (i + 0.5) * pitch + 3.1, (j + 0.5) * pitch + 1.7, area * 65535) ? 1 : 0;
  return out;
}

/** |DFT| of a real image (mean removed) at a spatial frequency (fx, fy) in cycles a mm. */
function dft(img: Float64Array, n: number, pitch: number, fx: number, fy: number): number {
  let mean = 0;
  for (const v of img) mean += v;
  mean /= img.length;
  let re = 0, im = 0;
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const ph = -2 * Math.PI * (fx * i * pitch + fy * j * pitch);
      const v = img[j * n + i] - mean;
      re += v * Math.cos(ph);
      im += v * Math.sin(ph);
    }
  }
  return Math.hypot(re, im);
}

/** The strongest frequency of the tint: a coarse polar search, then a finer one around the best. */
function strongest(img: Float64Array, n: number, pitch: number): { lpi: number; angleDeg: number } {
  let best = { f: 0, a: 0, m: -1 };
  const search = (f0: number, f1: number, fs: number, a0: number, a1: number, as: number) => {
    for (let f = f0; f <= f1 + 1e-9; f += fs) {
      for (let a = a0; a <= a1 + 1e-9; a += as) {
        const r = (a * Math.PI) / 180;
        const m = dft(img, n, pitch, f * Math.cos(r), f * Math.sin(r));
        if (m > best.m) best = { f, a, m };
      }
    }
  };
  // Angles 0–89.5°: a square dot screen repeats every 90°.
  search(100 / 25.4, 220 / 25.4, 0.3, 0, 89.5, 2.5);
  const c = best;
  search(c.f - 0.3, c.f + 0.3, 0.02, c.a - 2.5, c.a + 2.5, 0.2);
  return { lpi: best.f * 25.4, angleDeg: best.a };
}

describe("press-sim halftone screens", () => {
  // Screen angles C 15°, M 75°, Y 0°, K 45°: common practice, no published source (from memory).
  it.each([
    ["cyan", 150, PROCESS_ANGLES.c],
    ["magenta", 165, PROCESS_ANGLES.m],
    ["yellow", 175, PROCESS_ANGLES.y],
    ["black", 160, PROCESS_ANGLES.k],
  ])("a flat %s tint's strongest frequency is the ruling (%i lpi) at the screen angle", (_ink, lpi, angle) => {
    const n = 128, pitch = 0.035; // 4.5 mm at 726 samples an inch
    const m = strongest(tint(lpi, angle, 0.3, n, pitch), n, pitch);
    expect(Math.abs(m.lpi - lpi)).toBeLessThan(lpi * 0.02);
    const diff = Math.abs(((m.angleDeg - angle + 45 + 90) % 90) - 45);
    expect(diff).toBeLessThan(1);
  });

  // Murray & Davies (1936): R = 1 − a (1 − Rs) on white of reflectance 1, so a = (1 − R) / (1 − Rs).
  it.each([0.1, 0.25, 0.5, 0.75, 0.9])("a %f tint of black, screened without dot gain, reads back as that dot area by Murray–Davies", (a) => {
    const inks = inkSet(0);
    const n = 400, pitch = 0.013;
    const img = tint(150, PROCESS_ANGLES.k, inks.gain[Math.round(a * 255)] / 255, n, pitch);
    const solid = inks.primaries[8 * 3 + 1];
    let r = 0;
    for (const v of img) r += v ? solid : 1;
    r /= img.length;
    expect((1 - r) / (1 - solid)).toBeCloseTo(Math.round(a * 255) / 255, 2);
  });

  it("dot gain adds its stated points at 50 % and none at 0 and 100 %", () => {
    const { gain } = inkSet(0.14);
    expect(gain[0]).toBe(0);
    expect(gain[255]).toBe(255);
    expect(gain[128] / 255 - 128 / 255).toBeCloseTo(0.14, 2);
  });
});

describe("press-sim barcodes and colour", () => {
  it("EAN-13 check digit and width follow the symbology (GS1: 4006381333931 is a valid code; 95 modules)", () => {
    expect(ean13CheckDigit("400638133393")).toBe(1);
    expect(ean13Modules("4006381333931")).toHaveLength(95);
    // Guard bars 101 at both ends and 01010 in the middle.
    const m = ean13Modules("4006381333931");
    expect(m.slice(0, 3)).toBe("101");
    expect(m.slice(45, 50)).toBe("01010");
    expect(m.slice(92)).toBe("101");
  });

  // Sharma, Wu & Dalal (2005), "The CIEDE2000 color-difference formula", test data pairs 1, 7 and 17.
  it.each([
    [[50, 2.6772, -79.7751], [50, 0, -82.7485], 2.0425],
    [[50, 0, 0], [50, -1, 2], 2.3669],
    [[50, 2.5, 0], [73, 25, -18], 27.1492],
  ] as const)("ΔE00 of %j and %j is %f", (a, b, want) => {
    expect(deltaE00([...a], [...b])).toBeCloseTo(want, 4);
  });
});
