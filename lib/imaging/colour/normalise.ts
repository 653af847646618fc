// NORMALISE: bring the aligned scan's tone and colour onto the artwork with one robust global fit, so that a
// uniform drift (paper white, ink density, scanner cast) is reported once instead of flagged everywhere, and
// suppress noise, halftone screen and moiré with a low-pass sized in millimetres. The model itself lives in
// colour-model.ts; the pairs it is fitted on in samples.ts.
import sharp from "sharp";
import { deltaE00, srgbToLab } from "./colour";
import { evaluateModel, fitColourModel, identityModel, type ColourModel } from "./colour-model";
import { rgbaToRgb, rgbToRgba, type PxRect } from "../raster";
import { fitLightField, type LightField } from "./light-field";
import { sampleFlatPairs, type SamplePairs } from "./samples";
import type { Affine, RgbaImage } from "../types";

export { applyColourModel, mapColours, type ColourModel } from "./colour-model";

/** Low-pass of the comparison: Gaussian σ of max(0.12 mm, 1.2 px) — below that, halftone and noise dominate. */
export function lowPassSigmaPx(dpi: number): number {
  return Math.max((0.12 * dpi) / 25.4, 1.2);
}

/**
 * The low-pass of the comparison, the same for artwork and scan so that the two are blurred alike: a Gaussian
 * of σ px on the 8-bit encoded values (libvips through sharp, truncated where the kernel falls under 0.2 of its
 * peak — sharp's default). Encoded rather than linear light: libvips' vectorised 8-bit path costs a fifth of
 * the 16-bit one, and on simulated sheets the encoded pair left fewer false findings at 100 dpi (4 against 131
 * on two clean B2 sheets) and the same at 300 dpi (none on four). Returns RGBA with alpha 255.
 */
export async function lowPass(rgba: Uint8Array, width: number, height: number, sigmaPx: number): Promise<Uint8Array> {
  return rgbToRgba(await lowPassRgb(rgbaToRgb(rgba), width, height, sigmaPx));
}

/**
 * lowPass on RGB, 3 bytes a pixel in and out: libvips blurs three bands at a third of the cost of four (a
 * fourth band is taken for alpha and the image premultiplied), so the scan's band loop keeps to three.
 */
export async function lowPassRgb(rgb: Uint8Array, width: number, height: number, sigmaPx: number): Promise<Uint8Array> {
  const out = await sharp(rgb, { raw: { width, height, channels: 3 } }).blur(Math.max(0.3, sigmaPx)).raw().toBuffer();
  return new Uint8Array(out.buffer, out.byteOffset, out.length);
}

export interface NormalisationFit {
  model: ColourModel;
  /** Median ΔE00 of the raw scan against the artwork on flat areas: the sheet's uniform drift. */
  driftDeltaE00: number;
  /** Median ΔE00 left after normalisation on the same samples. */
  residualDeltaE00: number;
  flatSamples: number;
  /** The scanner's light across the page (light-field.ts), null when not measurable. */
  light: LightField | null;
}

const DRIFT_SAMPLES = 4000;

/** Fewer flat samples than this and the scan is compared as it is (no colour fit). */
const MIN_FLAT_SAMPLES = 30;

/** Fits the colour model of one sheet from its artwork and scan (no warp needed: samples map through the affine). */
export function fitNormalisation(
  artwork: RgbaImage,
  scan: RgbaImage,
  artworkToScan: Affine,
  inspectPx: PxRect,
  radiusPx: number,
): NormalisationFit {
  const pairs = sampleFlatPairs(artwork, scan, artworkToScan, inspectPx, radiusPx);
  const model = pairs.flatCount >= MIN_FLAT_SAMPLES ? fitColourModel(pairs) : identityModel();
  const { drift, residual } = measureDrift(pairs, model);
  const light = pairs.flatCount >= MIN_FLAT_SAMPLES ? fitLightField(pairs, model, artwork.width, artwork.height) : null;
  return { model, driftDeltaE00: drift, residualDeltaE00: residual, flatSamples: pairs.flatCount, light };
}

function measureDrift(pairs: SamplePairs, model: ColourModel): { drift: number; residual: number } {
  if (pairs.flatCount === 0) return { drift: 0, residual: 0 };
  // A median needs no more than a few thousand samples; take every k-th.
  const step = Math.max(1, Math.floor(pairs.flatCount / DRIFT_SAMPLES));
  const n = Math.floor(pairs.flatCount / step);
  const before = new Float32Array(n);
  const after = new Float32Array(n);
  for (let j = 0; j < n; j++) {
    const i = j * 3 * step;
    const a = pairs.flatArt, s = pairs.flatScan;
    const [l1, a1, b1] = srgbToLab(a[i] / 255, a[i + 1] / 255, a[i + 2] / 255);
    const [l2, a2, b2] = srgbToLab(s[i] / 255, s[i + 1] / 255, s[i + 2] / 255);
    before[j] = deltaE00(l1, a1, b1, l2, a2, b2);
    const m = evaluateModel(model, s[i], s[i + 1], s[i + 2]);
    const [l3, a3, b3] = srgbToLab(m[0] / 255, m[1] / 255, m[2] / 255);
    after[j] = deltaE00(l1, a1, b1, l3, a3, b3);
  }
  before.sort();
  after.sort();
  return { drift: before[n >> 1], residual: after[n >> 1] };
}
