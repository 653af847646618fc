// Normalisation: the low-pass and the sheet's colour fit. External references: IEC 61966-2-1 (sRGB transfer
// curve: linear 0.5 encodes to 0.7354) and colorjs.io for CIELAB (D65) of the artwork colours.
import { beforeAll, describe, expect, it } from "vitest";
import { deltaE00, srgb8ToLab } from "@/lib/imaging/colour/colour";
import { evaluateModel, identityModel, mapColours } from "@/lib/imaging/colour/colour-model";
import { fitNormalisation, lowPass, lowPassSigmaPx } from "@/lib/imaging/colour/normalise";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import type { ArtworkRaster } from "@/lib/imaging/types";
import { makeCartonPdf, PATCHES, type CartonLayout } from "@/tests/support/carton";
import { simulateSheet } from "@/tests/support/simulator/index";

const DPI = 150;
let artwork: ArtworkRaster;
let layout: CartonLayout;

beforeAll(async () => {
  const made = await makeCartonPdf({ widthMm: 150, heightMm: 110, rows: 1, columns: 2 });
  layout = made.layout;
  artwork = await rasterisePage(made.pdf, { dpi: DPI });
});

const press = { density: 1.1, paperWhite: [245, 243, 236] as [number, number, number], cast: [1, 0.98, 0.95] as [number, number, number], crossTalk: 0.04 };
const whole = () => ({ x: 0, y: 0, w: artwork.width, h: artwork.height });
const ab = (rgb: number[]) => srgb8ToLab(rgb[0], rgb[1], rgb[2]);

describe("low-pass", () => {
  it("is sized in millimetres, never under 1.2 px (max(0.12 mm, 1.2 px))", () => {
    expect(lowPassSigmaPx(100)).toBe(1.2);
    expect(lowPassSigmaPx(300)).toBeCloseTo(1.417, 3);
    expect(lowPassSigmaPx(600)).toBeCloseTo(2.835, 3);
  });

  it("blurs a step edge like a Gaussian of σ: within 8 levels of 255·Φ(x/σ) across the edge", async () => {
    // Φ from erf by Abramowitz & Stegun, Handbook of Mathematical Functions (1964), formula 7.1.26 (|error| < 1.5e-7).
    const erf = (x: number) => {
      const t = 1 / (1 + 0.3275911 * Math.abs(x));
      const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
      return x < 0 ? -y : y;
    };
    const phi = (x: number) => 0.5 * (1 + erf(x / Math.SQRT2));
    const w = 40, h = 9, sigma = 1.2, img = new Uint8Array(w * h * 4);
    for (let i = 0; i < w * h; i++) img.set(i % w < 20 ? [0, 0, 0, 255] : [255, 255, 255, 255], i * 4);
    const out = await lowPass(img, w, h, sigma);
    for (let x = 14; x < 26; x++) expect(Math.abs(out[(4 * w + x) * 4] - 255 * phi((x + 0.5 - 20) / sigma))).toBeLessThan(8);
    expect(out[(4 * w + 19) * 4] + out[(4 * w + 20) * 4]).toBeCloseTo(255, -1);
  });
});

describe("colour fit", () => {
  it("brings the saturated colour bar and the paper back within ΔE00 1.5 where the raw scan is off by 3 or more", async () => {
    const sim = await simulateSheet(artwork, { seed: 3, photometric: { press, scanner: { gamma: 1.06, noise: 2 } } });
    const fit = fitNormalisation(artwork, sim.scan, [1, 0, 0, 0, 1, 0], whole(), 5);
    expect(fit.driftDeltaE00).toBeGreaterThan(3);
    expect(fit.residualDeltaE00).toBeLessThan(1);
    for (const patch of layout.upParts[0].colourPatches) {
      const cx = Math.round(((patch.rect.x + patch.rect.w / 2) * DPI) / 25.4), cy = Math.round(((patch.rect.y + patch.rect.h / 2) * DPI) / 25.4);
      const mean = [0, 0, 0];
      for (let dy = -3; dy <= 3; dy++) for (let dx = -3; dx <= 3; dx++) for (let c = 0; c < 3; c++) mean[c] += sim.scan.data[((cy + dy) * artwork.width + cx + dx) * 4 + c] / 49;
      const raw = deltaE00(...ab(patch.rgb), ...ab(mean));
      const fitted = deltaE00(...ab(patch.rgb), ...ab(evaluateModel(fit.model, mean[0], mean[1], mean[2])));
      expect(fitted, `patch ${patch.rgb}`).toBeLessThan(1.5);
      expect(raw, `patch ${patch.rgb}`).toBeGreaterThan(fitted);
    }
    expect(PATCHES.length).toBe(layout.upParts[0].colourPatches.length);
  });

  it("keeps the black patch neutral and is not pulled by a pen mark on white paper", async () => {
    const fitWith = async (defects: NonNullable<Parameters<typeof simulateSheet>[1]>["defects"]) => {
      const sim = await simulateSheet(artwork, { seed: 4, photometric: { press, scanner: { noise: 1 } }, defects });
      return { sim, fit: fitNormalisation(artwork, sim.scan, [1, 0, 0, 0, 1, 0], whole(), 5) };
    };
    const clean = await fitWith([]);
    const marked = await fitWith([{ type: "dot", xMm: 80, yMm: 104, diameterMm: 4 }]);
    const black = layout.upParts[0].colourPatches.find((p) => p.rgb[0] === 25)!;
    const cx = Math.round(((black.rect.x + black.rect.w / 2) * DPI) / 25.4), cy = Math.round(((black.rect.y + black.rect.h / 2) * DPI) / 25.4);
    const p = (cy * artwork.width + cx) * 4;
    for (const { sim, fit } of [clean, marked]) {
      const out = evaluateModel(fit.model, sim.scan.data[p], sim.scan.data[p + 1], sim.scan.data[p + 2]);
      const [, a, b] = ab(out);
      expect(Math.hypot(a, b)).toBeLessThan(3);
      expect(deltaE00(...ab(black.rgb), ...ab(out))).toBeLessThan(2);
    }
    for (const v of [30, 90, 160, 220]) {
      expect(deltaE00(...ab(evaluateModel(clean.fit.model, v, v, v)), ...ab(evaluateModel(marked.fit.model, v, v, v)))).toBeLessThan(1);
    }
  });

  it("does not learn a colour-shifted patch away (the fit takes each artwork colour's median)", async () => {
    const lower = layout.upParts[1].lowerPanel!;
    const rect = { x: lower.x + 2, y: lower.y + 1, w: 8, h: 8 };
    const sim = await simulateSheet(artwork, { seed: 5, photometric: { press }, defects: [{ type: "colour_shift", rectMm: rect, hueDeg: 15 }] });
    const fit = fitNormalisation(artwork, sim.scan, [1, 0, 0, 0, 1, 0], whole(), 5);
    const p = (Math.round(((rect.y + 4) * DPI) / 25.4) * artwork.width + Math.round(((rect.x + 4) * DPI) / 25.4)) * 4;
    const art = [artwork.data[p], artwork.data[p + 1], artwork.data[p + 2]];
    const seen = evaluateModel(fit.model, sim.scan.data[p], sim.scan.data[p + 1], sim.scan.data[p + 2]);
    expect(deltaE00(...ab(art), ...ab(seen))).toBeGreaterThan(3);
  });
});

describe("mapColours", () => {
  // The identity table reproduces every colour exactly (its nodes lie on a straight line per channel), so each
  // layout of input and output can be checked against the input itself.
  const colours = [[0, 0, 0], [255, 255, 255], [12, 200, 99], [250, 1, 128], [12, 200, 99]];
  it("maps RGB into RGBA with alpha 255, and RGBA in place keeping alpha, aligned or not", () => {
    const rgb = Uint8Array.from(colours.flat());
    const out = new Uint8Array(colours.length * 4);
    mapColours(identityModel(), rgb, 3, out);
    expect([...out]).toEqual(colours.flatMap((c) => [...c, 255]));
    const rgba = Uint8Array.from(colours.flatMap((c, k) => [...c, 10 * k]));
    mapColours(identityModel(), rgba, 4, rgba);
    expect([...rgba]).toEqual(colours.flatMap((c, k) => [...c, 10 * k]));
    // A view one byte into its buffer cannot take word stores.
    const offset = new Uint8Array(colours.length * 4 + 1).subarray(1);
    offset.set(colours.flatMap((c) => [...c, 77]));
    mapColours(identityModel(), offset, 4, offset);
    expect([...offset]).toEqual(colours.flatMap((c) => [...c, 77]));
  });
});
