// The press sheet on a flatbed: the printed sheet (screened separations composed through the inks, on board with
// fibre and mottle, with ink mottle in the solids) is laid on the glass at any quarter turn ± a small angle, and
// each scan pixel averages k × k points of it (so the halftone aliases into moiré as it does on a real scanner).
// Then the optics blur, light falls off across the glass, the scanner adds a cast, its tone curves and noise.
import type { Separations } from "./ghostscript";
import { CELL, screenBasis, THRESHOLD, type Screen } from "./halftone";
import type { InkSet } from "./inks";
import type { Random } from "./random";
import { noiseAt, type NoiseField } from "./texture";
import { srgbEncode } from "./colour";

export interface Placement {
  /** Sheet turned by quarter × 90° + angleDeg (clockwise in the image). */
  quarter: 0 | 1 | 2 | 3;
  angleDeg: number;
  /** Glass area scanned, mm. */
  glassWidthMm: number;
  glassHeightMm: number;
  /** Where the sheet's centre lands on the glass, mm. */
  centreXMm: number;
  centreYMm: number;
}

export interface Press {
  sep: Separations;
  sheetWidthMm: number;
  sheetHeightMm: number;
  inks: InkSet;
  screens: [Screen, Screen, Screen, Screen];
  /** Linear RGB reflectance of the bare board. */
  paper: [number, number, number];
  fibre: NoiseField;
  mottle: NoiseField;
  inkMottle: NoiseField;
}

export interface ScannerSettings {
  dpi: number;
  /** Points averaged per scan pixel along each axis. */
  samples: number;
  blurSigmaPx: number;
  /** Light across the glass: 1 + ax·(2u − 1) + ay·(2v − 1) + q·(r² − ½); peak deviation ≤ 3 %. */
  falloff: { ax: number; ay: number; q: number };
  cast: [number, number, number];
  gamma: [number, number, number];
  noise: number;
  lid: [number, number, number];
}

export interface ScanRaster {
  width: number;
  height: number;
  dpi: number;
  /** Interleaved R, G, B, encoded 0–1 (what the scanner writes before quantising). */
  rgb: Float32Array;
}

export function scanSheet(press: Press, place: Placement, s: ScannerSettings, rng: Random): ScanRaster {
  const width = Math.round((place.glassWidthMm * s.dpi) / 25.4), height = Math.round((place.glassHeightMm * s.dpi) / 25.4);
  const mmPerPx = 25.4 / s.dpi;
  const phi = ((place.quarter * 90 + place.angleDeg) * Math.PI) / 180, cos = Math.cos(phi), sin = Math.sin(phi);
  const { sep, inks } = press;
  const kp = sep.dpi / 25.4;
  const bases = press.screens.map(screenBasis);
  const ba = bases.map((b) => b.a), bb = bases.map((b) => b.b);
  const k = s.samples, kk = k * k;
  const lin = new Float32Array(width * height * 3);
  const P = inks.primaries, gain = inks.gain;
  const cs = [press.sheetWidthMm / 2, press.sheetHeightMm / 2];
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      let r = 0, g = 0, b = 0, onSheet = 0;
      for (let sb = 0; sb < k; sb++) {
        const gy = (j + (sb + 0.5) / k) * mmPerPx - place.centreYMm;
        for (let sa = 0; sa < k; sa++) {
          const gx = (i + (sa + 0.5) / k) * mmPerPx - place.centreXMm;
          // Glass → sheet: the inverse turn.
          const x = cos * gx + sin * gy + cs[0], y = -sin * gx + cos * gy + cs[1];
          const px = (x * kp) | 0, py = (y * kp) | 0;
          if (x < 0 || y < 0 || px >= sep.width || py >= sep.height) continue;
          onSheet++;
          const o = (py * sep.width + px) * 4;
          let idx = 0;
          for (let c = 0; c < 4; c++) {
            const area = gain[sep.cmyk[o + c]];
            if (area === 0) continue;
            if (area === 255) { idx |= 1 << c; continue; }
            const u = ba[c] * x + bb[c] * y, v = -bb[c] * x + ba[c] * y;
            const ci = ((u - Math.floor(u)) * CELL) | 0, cj = ((v - Math.floor(v)) * CELL) | 0;
            if (area * 257 > THRESHOLD[cj * CELL + ci]) idx |= 1 << c;
          }
          r += P[idx * 3];
          g += P[idx * 3 + 1];
          b += P[idx * 3 + 2];
        }
      }
      const o = (j * width + i) * 3;
      const lidShare = (kk - onSheet) / kk;
      if (onSheet === 0) {
        lin[o] = s.lid[0]; lin[o + 1] = s.lid[1]; lin[o + 2] = s.lid[2];
        continue;
      }
      // Texture at the pixel's centre, in sheet mm.
      const gx = (i + 0.5) * mmPerPx - place.centreXMm, gy = (j + 0.5) * mmPerPx - place.centreYMm;
      const x = cos * gx + sin * gy + cs[0], y = -sin * gx + cos * gy + cs[1];
      const board = 1 + noiseAt(press.fibre, x, y) + noiseAt(press.mottle, x, y);
      const m = 1 + noiseAt(press.inkMottle, x, y);
      for (let c = 0; c < 3; c++) {
        const rel = (c === 0 ? r : c === 1 ? g : b) / onSheet;
        // Ink mottle changes the ink's density, so it shows in solids and not on bare board.
        const printed = (rel >= 0.999 ? rel : Math.exp(Math.log(Math.max(1e-4, rel)) * m)) * press.paper[c] * board;
        lin[o + c] = printed * (1 - lidShare) + s.lid[c] * lidShare;
      }
    }
  }
  blur(lin, width, height, s.blurSigmaPx);
  const rgb = lin;
  // Encoding and each channel's tone curve as one table on linear light (4096 steps, interpolated).
  const STEPS = 4096;
  const curves = s.gamma.map((gm) => Float32Array.from({ length: STEPS + 2 }, (_, i) => Math.pow(srgbEncode(Math.min(1, i / STEPS)), gm)));
  const normals = Float32Array.from({ length: 1 << 16 }, () => rng.normal());
  let state = ((rng.next() * 4294967296) >>> 0) || 1;
  for (let j = 0; j < height; j++) {
    const v = 2 * (j / height) - 1;
    for (let i = 0; i < width; i++) {
      const u = 2 * (i / width) - 1;
      const light = 1 + s.falloff.ax * u + s.falloff.ay * v + s.falloff.q * ((u * u + v * v) / 2 - 1 / 3);
      const o = (j * width + i) * 3;
      for (let c = 0; c < 3; c++) {
        const t = Math.min(1, Math.max(0, lin[o + c] * light * s.cast[c])) * STEPS, ti = t | 0, curve = curves[c];
        const e = curve[ti] + (curve[ti + 1] - curve[ti]) * (t - ti);
        // xorshift picks from a table of normal deviates: far cheaper than one Box–Muller draw a sample.
        state ^= state << 13; state ^= state >>> 17; state ^= state << 5;
        rgb[o + c] = Math.min(1, Math.max(0, e + s.noise * normals[(state >>> 0) & 0xffff]));
      }
    }
  }
  return { width, height, dpi: s.dpi, rgb };
}

/** Separable Gaussian on interleaved RGB, in place. */
function blur(img: Float32Array, width: number, height: number, sigma: number): void {
  const radius = Math.ceil(3 * sigma);
  const kernel = new Float32Array(2 * radius + 1);
  let sum = 0;
  for (let i = -radius; i <= radius; i++) sum += kernel[i + radius] = Math.exp(-(i * i) / (2 * sigma * sigma));
  for (let i = 0; i < kernel.length; i++) kernel[i] /= sum;
  const line = new Float32Array(Math.max(width, height) * 3);
  const pass = (n: number, count: number, at: (line: number, pos: number) => number) => {
    for (let l = 0; l < count; l++) {
      for (let p = 0; p < n; p++) for (let c = 0; c < 3; c++) line[p * 3 + c] = img[at(l, p) + c];
      for (let p = 0; p < n; p++) {
        let r = 0, g = 0, b = 0;
        for (let t = -radius; t <= radius; t++) {
          const q = Math.min(n - 1, Math.max(0, p + t)) * 3, w = kernel[t + radius];
          r += w * line[q]; g += w * line[q + 1]; b += w * line[q + 2];
        }
        const o = at(l, p);
        img[o] = r; img[o + 1] = g; img[o + 2] = b;
      }
    }
  };
  pass(width, height, (row, x) => (row * width + x) * 3);
  pass(height, width, (col, y) => (y * width + col) * 3);
}
