import { readFileSync } from "node:fs";
import path from "node:path";
import Color from "colorjs.io";
import { describe, expect, it } from "vitest";
import {
  D65_WHITE,
  deltaE00,
  deltaE76,
  labF,
  labFFast,
  linearToSrgb255Fast,
  rgbaToLab,
  srgb8ToLab,
  srgbToLinear,
  linearToSrgb,
  SRGB8_TO_LINEAR,
} from "@/lib/imaging/colour/colour";

// Kept in the repository so a clean clone tests on its own (the published table, unchanged).
const SHARMA = path.resolve(import.meta.dirname, "../reference/ciede2000-sharma-2005.csv");

function sharmaPairs(): number[][] {
  return readFileSync(SHARMA, "utf8")
    .split("\n")
    .filter((line) => /^\d/.test(line))
    .map((line) => line.split(",").map(Number));
}

/** colorjs.io 0.7.1 (L. Verou, C. Lilley) as the reference: sRGB → Lab relative to D65 without adaptation. */
function referenceLab(r: number, g: number, b: number): number[] {
  return new Color("srgb", [r / 255, g / 255, b / 255]).to("lab-d65").coords.map(Number);
}

/** Deterministic pseudo-random colours (mulberry32) so a failure can be reproduced. */
function randomColours(count: number, seed: number): [number, number, number][] {
  let s = seed >>> 0;
  const next = () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return Array.from({ length: count }, () => [0, 0, 0].map(() => Math.floor(next() * 256)) as [number, number, number]);
}

const NAMED: [string, [number, number, number]][] = [
  ["black", [0, 0, 0]],
  ["white", [255, 255, 255]],
  ["red", [255, 0, 0]],
  ["green", [0, 255, 0]],
  ["blue", [0, 0, 255]],
  ["cyan", [0, 255, 255]],
  ["magenta", [255, 0, 255]],
  ["yellow", [255, 255, 0]],
  ["grey 1", [1, 1, 1]],
  ["grey 10", [10, 10, 10]],
  ["grey 50", [50, 50, 50]],
  ["grey 128", [128, 128, 128]],
  ["grey 200", [200, 200, 200]],
  ["grey 254", [254, 254, 254]],
  ["light skin", [224, 172, 140]],
  ["medium skin", [198, 134, 96]],
  ["dark skin", [110, 72, 52]],
  ["near-black blue", [0, 0, 3]],
];
const SPREAD: [number, number, number][] = [...NAMED.map(([, c]) => c), ...randomColours(200, 20261201)];

describe("CIEDE2000 (CIE 142-2001)", () => {
  const pairs = sharmaPairs();

  it("reads all 34 pairs of Sharma, Wu & Dalal 2005, Table 1", () => {
    expect(pairs).toHaveLength(34);
  });

  it.each(pairs.map((p) => [p[0], p] as const))(
    "pair %i matches Sharma, Wu & Dalal 2005, Table 1, to 4 decimals",
    (_n, [, l1, a1, b1, l2, a2, b2, expected]) => {
      expect(deltaE00(l1, a1, b1, l2, a2, b2)).toBeCloseTo(expected, 4);
      // The formula is symmetric (Sharma et al. 2005, section 3).
      expect(deltaE00(l2, a2, b2, l1, a1, b1)).toBeCloseTo(expected, 4);
    },
  );

  it("is zero for identical colours, neutral ones included", () => {
    expect(deltaE00(50, 0, 0, 50, 0, 0)).toBe(0);
    expect(deltaE00(62.1, 12.5, -33, 62.1, 12.5, -33)).toBe(0);
  });
});

describe("ΔE*ab 1976 (CIE 15:2004, eq. 8.9)", () => {
  it("is the Euclidean distance in CIELAB", () => {
    expect(deltaE76(50, 3, 4, 50, 0, 0)).toBeCloseTo(5, 12);
    expect(deltaE76(0, 0, 0, 100, 0, 0)).toBe(100);
  });
});

describe("sRGB transfer curve (IEC 61966-2-1)", () => {
  it("round-trips every 8-bit code through the inverse curve", () => {
    for (let i = 0; i < 256; i++) {
      expect(Math.round(linearToSrgb(SRGB8_TO_LINEAR[i]) * 255)).toBe(i);
    }
  });

  it("has the linear toe below 0.04045 and the table equals the exact curve", () => {
    expect(srgbToLinear(0.04)).toBeCloseTo(0.04 / 12.92, 12);
    expect(srgbToLinear(1)).toBeCloseTo(1, 12);
    for (let i = 0; i < 256; i++) expect(SRGB8_TO_LINEAR[i]).toBe(srgbToLinear(i / 255));
  });
});

describe("sRGB → CIELAB (D65 white, no adaptation)", () => {
  it("maps white to L* = 100, a* = b* = 0 and the white point is D65 (x 0.3127, y 0.3290)", () => {
    const [l, a, b] = srgb8ToLab(255, 255, 255);
    expect(l).toBeCloseTo(100, 6);
    expect(a).toBeCloseTo(0, 6);
    expect(b).toBeCloseTo(0, 6);
    expect(D65_WHITE[0]).toBeCloseTo(0.95046, 5);
    expect(D65_WHITE[2]).toBeCloseTo(1.08906, 5);
  });

  it(`exact path agrees with colorjs.io 0.7.1 "lab-d65" within 0.01 on ${SPREAD.length} colours`, () => {
    let worst = 0;
    for (const [r, g, b] of SPREAD) {
      const ours = srgb8ToLab(r, g, b);
      const ref = referenceLab(r, g, b);
      for (let k = 0; k < 3; k++) worst = Math.max(worst, Math.abs(ours[k] - ref[k]));
    }
    expect(worst).toBeLessThan(0.01);
  });

  it("table (fast) path agrees with colorjs.io within 0.01 and with the exact path within 0.001 ΔE*ab", () => {
    const rgba = new Uint8Array(SPREAD.length * 4);
    SPREAD.forEach(([r, g, b], i) => rgba.set([r, g, b, 255], i * 4));
    const lab = rgbaToLab(rgba);
    let worstRef = 0;
    let worstExact = 0;
    SPREAD.forEach(([r, g, b], i) => {
      const ref = referenceLab(r, g, b);
      const exact = srgb8ToLab(r, g, b);
      const fast = [lab[i * 3], lab[i * 3 + 1], lab[i * 3 + 2]];
      for (let k = 0; k < 3; k++) worstRef = Math.max(worstRef, Math.abs(fast[k] - ref[k]));
      worstExact = Math.max(worstExact, deltaE76(fast[0], fast[1], fast[2], exact[0], exact[1], exact[2]));
    });
    expect(worstRef).toBeLessThan(0.01);
    expect(worstExact).toBeLessThan(0.001);
  });

  it("fast f(t) stays within 1e-6 of the exact f(t) over [0, 1]", () => {
    let worst = 0;
    for (let i = 0; i <= 200_000; i++) {
      const t = i / 200_000;
      worst = Math.max(worst, Math.abs(labFFast(t) - labF(t)));
    }
    expect(worst).toBeLessThan(1e-6);
    expect(labFFast(1.02)).toBe(labF(1.02));
  });

  it("fast linear → sRGB encoding stays within 0.01 of a code of IEC 61966-2-1's curve over [0, 1]", () => {
    let worst = 0;
    for (let i = 0; i <= 200_000; i++) {
      const v = i / 200_000;
      worst = Math.max(worst, Math.abs(linearToSrgb255Fast(v) - 255 * linearToSrgb(v)));
    }
    expect(worst).toBeLessThan(0.01);
    expect(linearToSrgb255Fast(-1)).toBe(0);
    expect(linearToSrgb255Fast(2)).toBe(255);
  });

  it("reuses an output buffer and rejects wrong sizes with a clear message", () => {
    const rgba = new Uint8ClampedArray([255, 0, 0, 255, 0, 0, 0, 0]);
    const out = new Float32Array(6);
    expect(rgbaToLab(rgba, out)).toBe(out);
    expect(() => rgbaToLab(new Uint8Array(5))).toThrow(/multiple of 4/);
    expect(() => rgbaToLab(rgba, new Float32Array(5))).toThrow(/must hold 6 values/);
  });
});
