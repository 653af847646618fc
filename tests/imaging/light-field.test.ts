// The light field: a flatbed's smooth fall-off of light across the glass (a few per cent; the figure
// of ±3 % is common practice, no published source), fitted from flat pairs and divided out. The check is
// against the gain that made the samples (known here) and against sRGB's transfer function (IEC 61966-2-1,
// as colour.ts implements it: a pixel divided by its gain in linear light comes back to the artwork).
import { describe, expect, it } from "vitest";
import { linearToSrgb255Fast, SRGB8_TO_LINEAR } from "@/lib/imaging/colour/colour";
import { identityModel } from "@/lib/imaging/colour/colour-model";
import { fitLightField, removeLightField } from "@/lib/imaging/colour/light-field";
import type { SamplePairs } from "@/lib/imaging/colour/samples";

const W = 2000, H = 1400;
const gain = (x: number, y: number) => {
  const u = (2 * x) / W - 1, v = (2 * y) / H - 1;
  return 1 + 0.02 * u - 0.012 * v - 0.015 * (u * u + v * v - 0.5);
};

/** Flat pairs on a grid: artwork tints, the scan the same tints under `gain`; `spoilt` of them a dark blot. */
function pairs(spoilt = 0): SamplePairs {
  const n = 40 * 28;
  const p: SamplePairs = { flatArt: new Float32Array(n * 3), flatScan: new Float32Array(n * 3), flatPos: new Float32Array(n * 2), flatCount: n, allArt: new Float32Array(0), allScan: new Float32Array(0), allCount: 0, smoothArt: new Float32Array(0), smoothScan: new Float32Array(0), smoothCount: 0 };
  const tints = [[250, 248, 240], [230, 200, 160], [180, 210, 235]];
  for (let i = 0; i < n; i++) {
    const x = ((i % 40) + 0.5) * (W / 40), y = (Math.floor(i / 40) + 0.5) * (H / 28);
    p.flatPos[i * 2] = x;
    p.flatPos[i * 2 + 1] = y;
    const t = tints[i % 3];
    for (let c = 0; c < 3; c++) {
      p.flatArt[i * 3 + c] = t[c];
      const blot = i % 97 < spoilt ? 0.5 : 1;
      p.flatScan[i * 3 + c] = Math.round(linearToSrgb255Fast(SRGB8_TO_LINEAR[t[c]] * gain(x, y) * blot));
    }
  }
  return p;
}

describe("the light field", () => {
  it("recovers a quadratic fall-off of light to within 0.3 % over the page, keeping its mean at 1", () => {
    const field = fitLightField(pairs(), identityModel(), W, H)!;
    expect(field).not.toBeNull();
    // The fit is normalised to a mean of 1: compare against the true gain over its own mean.
    let mean = 0;
    for (let j = 0; j <= 8; j++) for (let i = 0; i <= 8; i++) mean += gain((i / 8) * W, (j / 8) * H) / 81;
    for (const [x, y] of [[0, 0], [W, 0], [W / 2, H / 2], [0, H], [W, H], [W / 3, (2 * H) / 3]]) {
      const u = (2 * x) / W - 1, v = (2 * y) / H - 1;
      for (let c = 0; c < 3; c++) {
        const k = field.coef.subarray(c * 6, c * 6 + 6);
        const g = k[0] + k[1] * u + k[2] * v + k[3] * u * u + k[4] * u * v + k[5] * v * v;
        expect(Math.abs(g - gain(x, y) / mean)).toBeLessThan(0.003);
      }
    }
  });

  it("is not pulled by blots on a few samples (a defect, a true colour shift)", () => {
    const clean = fitLightField(pairs(), identityModel(), W, H)!;
    const blotted = fitLightField(pairs(4), identityModel(), W, H)!;
    for (let k = 0; k < 18; k++) expect(Math.abs(blotted.coef[k] - clean.coef[k])).toBeLessThan(0.003);
  });

  it("refuses a field beyond ±8 % (that is not light fall-off) and too few samples", () => {
    const p = pairs();
    for (let i = 0; i < p.flatCount; i++) if (p.flatPos[i * 2] < W / 2) for (let c = 0; c < 3; c++) p.flatScan[i * 3 + c] *= 0.7;
    expect(fitLightField(p, identityModel(), W, H)).toBeNull();
    expect(fitLightField({ ...pairs(), flatCount: 20 }, identityModel(), W, H)).toBeNull();
  });

  it("divides the gain out of a scan rectangle in linear light", () => {
    const field = fitLightField(pairs(), identityModel(), W, H)!;
    const x0 = 1500, y0 = 1000, w = 40, h = 3;
    const rgba = new Uint8Array(w * h * 4);
    const art = [230, 200, 160];
    for (let i = 0; i < w * h; i++) {
      const x = x0 + (i % w), y = y0 + Math.floor(i / w);
      for (let c = 0; c < 3; c++) rgba[i * 4 + c] = Math.round(linearToSrgb255Fast(SRGB8_TO_LINEAR[art[c]] * field.coef[c * 6] * gainOf(field, c, x, y) / field.coef[c * 6]));
      rgba[i * 4 + 3] = 255;
    }
    removeLightField(field, rgba, w, h, x0, y0);
    for (let i = 0; i < w * h; i++) for (let c = 0; c < 3; c++) expect(Math.abs(rgba[i * 4 + c] - art[c])).toBeLessThanOrEqual(1);
  });
});

function gainOf(field: { coef: Float64Array }, c: number, x: number, y: number): number {
  const u = (2 * x) / W - 1, v = (2 * y) / H - 1, k = field.coef.subarray(c * 6, c * 6 + 6);
  return k[0] + k[1] * u + k[2] * v + k[3] * u * u + k[4] * u * v + k[5] * v * v;
}
