// Press and scanner photometry for simulated sheets: ink denser or lighter, paper white below 255, a colour
// cast, cross-talk between channels (inks are not ideal filters), a scanner tone curve, a halftone screen
// (which beats against the scan grid into moiré), scanner blur, noise and a JPEG round trip.
// The figures are invented to resemble a flatbed scan of an offset sheet; none is a published measurement.
import sharp from "sharp";
import type { RgbaImage } from "@/lib/imaging/types";
import { gaussian, type Random } from "./random";

export interface PressOptions {
  /** Ink density factor: reflectance ρ → ρ^density per channel (1 = as the artwork, 1.1 = 10 % denser). */
  density?: number;
  /** Paper white as scanned, 8-bit sRGB. */
  paperWhite?: [number, number, number];
  /** Per-channel gain in linear light (a cast). */
  cast?: [number, number, number];
  /** Share of each channel's reflectance leaking into the other two (0–0.1). */
  crossTalk?: number;
  /** Halftone screen: rulings in lines per inch and angle; amplitude 0–1 of the modulation in mid-tones. */
  halftone?: { lpi: number; angleDeg: number; amplitude: number };
}

export interface ScannerOptions {
  /** Scanner tone curve exponent on encoded values (1 = none). */
  gamma?: number;
  /** Gaussian σ of the scanner's blur, mm. */
  blurMm?: number;
  /** Gaussian noise σ, 8-bit levels. */
  noise?: number;
  /** JPEG round trip at this quality (1–100); none when absent. */
  jpegQuality?: number;
}

const toLinear = Float64Array.from({ length: 256 }, (_, i) => {
  const v = i / 255;
  return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
});

function encode(v: number): number {
  const c = v <= 0 ? 0 : v >= 1 ? 1 : v;
  const e = c <= 0.0031308 ? c * 12.92 : 1.055 * c ** (1 / 2.4) - 0.055;
  return e * 255;
}

/** Ink, paper, cast, cross-talk and halftone, in place, in the printed sheet's own pixel grid. */
export function applyPress(img: RgbaImage & { dpi: number }, o: PressOptions): void {
  const density = o.density ?? 1;
  const paper = (o.paperWhite ?? [255, 255, 255]).map((v) => toLinear[Math.round(v)]);
  const cast = o.cast ?? [1, 1, 1];
  const k = o.crossTalk ?? 0;
  const inkLut = [0, 1, 2].map((c) => Float64Array.from({ length: 256 }, (_, i) => paper[c] * cast[c] * toLinear[i] ** density));
  const ht = o.halftone;
  const period = ht ? img.dpi / ht.lpi : 1;
  const ca = ht ? Math.cos((ht.angleDeg * Math.PI) / 180) : 1, sa = ht ? Math.sin((ht.angleDeg * Math.PI) / 180) : 0;
  const d = img.data;
  for (let y = 0, p = 0; y < img.height; y++) {
    for (let x = 0; x < img.width; x++, p += 4) {
      let r = inkLut[0][d[p]], g = inkLut[1][d[p + 1]], b = inkLut[2][d[p + 2]];
      if (k > 0) {
        const m = (r + g + b) * k;
        r = r * (1 - 3 * k) + m; g = g * (1 - 3 * k) + m; b = b * (1 - 3 * k) + m;
      }
      if (ht) {
        const u = (2 * Math.PI * (x * ca + y * sa)) / period, v = (2 * Math.PI * (-x * sa + y * ca)) / period;
        const s = ht.amplitude * Math.cos(u) * Math.cos(v);
        r += s * r * (paper[0] - r) * 4 * 0.5; g += s * g * (paper[1] - g) * 4 * 0.5; b += s * b * (paper[2] - b) * 4 * 0.5;
      }
      d[p] = encode(r) + 0.5; d[p + 1] = encode(g) + 0.5; d[p + 2] = encode(b) + 0.5;
    }
  }
}

/** Scanner tone curve, blur, noise and JPEG; returns a new buffer. */
export async function applyScanner(img: RgbaImage & { dpi: number }, o: ScannerOptions, random: Random): Promise<Uint8Array> {
  let data = new Uint8Array(img.data);
  const gamma = o.gamma ?? 1;
  if (gamma !== 1) {
    const lut = Uint8Array.from({ length: 256 }, (_, i) => Math.round(255 * (i / 255) ** gamma));
    for (let p = 0; p < data.length; p += 4) { data[p] = lut[data[p]]; data[p + 1] = lut[data[p + 1]]; data[p + 2] = lut[data[p + 2]]; }
  }
  const raw = { raw: { width: img.width, height: img.height, channels: 4 as const } };
  if (o.blurMm && o.blurMm > 0) {
    // Optics blend light linearly: blur in linear light, 16 bits a channel.
    const sigma = Math.max(0.3, (o.blurMm * img.dpi) / 25.4);
    const n = img.width * img.height;
    const linear = new Uint16Array(n * 3);
    for (let i = 0; i < n; i++) for (let c = 0; c < 3; c++) linear[i * 3 + c] = Math.round(toLinear[data[i * 4 + c]] * 65535);
    const out = await sharp(linear, { raw: { width: img.width, height: img.height, channels: 3 } }).blur(sigma).toColourspace("rgb16").raw({ depth: "ushort" }).toBuffer();
    const blurred = new Uint16Array(out.buffer, out.byteOffset, out.length / 2);
    for (let i = 0; i < n; i++) for (let c = 0; c < 3; c++) data[i * 4 + c] = Math.round(encode(blurred[i * 3 + c] / 65535));
  }
  if (o.noise && o.noise > 0) {
    for (let p = 0; p < data.length; p += 4) {
      for (let c = 0; c < 3; c++) data[p + c] = Math.min(255, Math.max(0, Math.round(data[p + c] + gaussian(random) * o.noise!)));
    }
  }
  if (o.jpegQuality) {
    const jpeg = await sharp(data, raw).removeAlpha().jpeg({ quality: o.jpegQuality, chromaSubsampling: "4:2:0" }).toBuffer();
    data = new Uint8Array(await sharp(jpeg).ensureAlpha().raw().toBuffer());
  }
  return data;
}
