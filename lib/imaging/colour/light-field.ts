// LIGHT FIELD: a flatbed's light falls off across the glass by a few per cent, which the sheet's one colour fit
// cannot remove: on a light tint 3 % of light is ΔE00 ≈ 2–3, the size of a real colour shift. The fall-off is
// smooth and acts on reflectance (linear light) alike for every colour, so it is fitted per sheet as a
// quadratic gain per channel over the page, from the flat pairs the colour fit used (scan through the fitted
// model against the artwork), robustly (a defect or a true colour shift covers a few samples, the light all of
// them), and divided out of the scan before the comparison.
import { linearToSrgb255Fast, SRGB8_TO_LINEAR } from "./colour";
import { evaluateModel, type ColourModel } from "./colour-model";
import type { SamplePairs } from "./samples";

/** Gain g(x, y) = Σ coef · [1, u, v, u², u·v, v²] per channel, u and v the page position scaled to −1 … 1. */
export interface LightField {
  /** 6 coefficients a channel, R then G then B. */
  coef: Float64Array;
  width: number;
  height: number;
}

/** Artwork samples darker than this (linear light) carry too little light to measure a gain on. */
const MIN_LINEAR = 0.12;
const MIN_SAMPLES = 60;
/** Gains beyond ±8 % are not light fall-off: the fit is not used. */
const MAX_GAIN_DEVIATION = 0.08;
const TRIM_ROUNDS = 3;

function basis(u: number, v: number, out: Float64Array): void {
  out[0] = 1; out[1] = u; out[2] = v; out[3] = u * u; out[4] = u * v; out[5] = v * v;
}

/** The sheet's light field, or null when the flat pairs are too few or the fit is implausible. */
export function fitLightField(pairs: SamplePairs, model: ColourModel, width: number, height: number): LightField | null {
  const n = pairs.flatCount;
  if (n < MIN_SAMPLES) return null;
  const lin = SRGB8_TO_LINEAR;
  const ratio = [new Float64Array(n), new Float64Array(n), new Float64Array(n)];
  const ok = [new Uint8Array(n), new Uint8Array(n), new Uint8Array(n)];
  const u = new Float64Array(n), v = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const a = pairs.flatArt, s = pairs.flatScan;
    const m = evaluateModel(model, s[i * 3], s[i * 3 + 1], s[i * 3 + 2]);
    u[i] = (2 * pairs.flatPos[i * 2]) / width - 1;
    v[i] = (2 * pairs.flatPos[i * 2 + 1]) / height - 1;
    for (let c = 0; c < 3; c++) {
      const la = lin[Math.round(a[i * 3 + c])];
      if (la < MIN_LINEAR) continue;
      ratio[c][i] = lin[m[c]] / la;
      ok[c][i] = 1;
    }
  }
  const coef = new Float64Array(18);
  for (let c = 0; c < 3; c++) {
    const fit = robustQuadratic(u, v, ratio[c], ok[c]);
    if (!fit) return null;
    coef.set(fit, c * 6);
  }
  // The colour model already holds the sheet's mean level: keep the field's mean at 1 over the page.
  const b = new Float64Array(6);
  for (let c = 0; c < 3; c++) {
    let sum = 0, count = 0, worst = 0;
    for (let j = 0; j <= 8; j++) for (let i = 0; i <= 8; i++) {
      basis(i / 4 - 1, j / 4 - 1, b);
      let g = 0;
      for (let k = 0; k < 6; k++) g += coef[c * 6 + k] * b[k];
      sum += g; count++;
      worst = Math.max(worst, Math.abs(g - 1));
    }
    if (worst > MAX_GAIN_DEVIATION) return null;
    const mean = sum / count;
    for (let k = 0; k < 6; k++) coef[c * 6 + k] /= mean;
  }
  return { coef, width, height };
}

/** Least squares of a quadratic in (u, v), refitted without samples beyond 3 × the residuals' MAD. */
function robustQuadratic(u: Float64Array, v: Float64Array, y: Float64Array, use: Uint8Array): Float64Array | null {
  const keep = Uint8Array.from(use);
  const b = new Float64Array(6);
  let coef: Float64Array | null = null;
  for (let round = 0; round <= TRIM_ROUNDS; round++) {
    const ata = new Float64Array(36), aty = new Float64Array(6);
    let count = 0;
    for (let i = 0; i < y.length; i++) {
      if (!keep[i]) continue;
      basis(u[i], v[i], b);
      for (let p = 0; p < 6; p++) {
        aty[p] += b[p] * y[i];
        for (let q = 0; q < 6; q++) ata[p * 6 + q] += b[p] * b[q];
      }
      count++;
    }
    if (count < MIN_SAMPLES) return coef;
    const solved = solve6(ata, aty);
    if (!solved) return coef;
    coef = solved;
    if (round === TRIM_ROUNDS) break;
    const res: number[] = [];
    for (let i = 0; i < y.length; i++) if (keep[i]) res.push(Math.abs(y[i] - evalAt(coef, 0, u[i], v[i], b)));
    res.sort((p, q) => p - q);
    const mad = Math.max(1e-4, res[res.length >> 1]);
    for (let i = 0; i < y.length; i++) if (keep[i] && Math.abs(y[i] - evalAt(coef, 0, u[i], v[i], b)) > 3 * 1.4826 * mad) keep[i] = 0;
  }
  return coef;
}

function evalAt(coef: Float64Array, o: number, u: number, v: number, b: Float64Array): number {
  basis(u, v, b);
  let g = 0;
  for (let k = 0; k < 6; k++) g += coef[o + k] * b[k];
  return g;
}

/** Gaussian elimination with partial pivoting on a 6 × 6 system; null when singular. */
function solve6(a: Float64Array, y: Float64Array): Float64Array | null {
  const m = Float64Array.from(a), r = Float64Array.from(y);
  for (let col = 0; col < 6; col++) {
    let piv = col;
    for (let row = col + 1; row < 6; row++) if (Math.abs(m[row * 6 + col]) > Math.abs(m[piv * 6 + col])) piv = row;
    if (Math.abs(m[piv * 6 + col]) < 1e-12) return null;
    if (piv !== col) {
      for (let k = 0; k < 6; k++) [m[col * 6 + k], m[piv * 6 + k]] = [m[piv * 6 + k], m[col * 6 + k]];
      [r[col], r[piv]] = [r[piv], r[col]];
    }
    for (let row = col + 1; row < 6; row++) {
      const f = m[row * 6 + col] / m[col * 6 + col];
      for (let k = col; k < 6; k++) m[row * 6 + k] -= f * m[col * 6 + k];
      r[row] -= f * r[col];
    }
  }
  const x = new Float64Array(6);
  for (let row = 5; row >= 0; row--) {
    let s = r[row];
    for (let k = row + 1; k < 6; k++) s -= m[row * 6 + k] * x[k];
    x[row] = s / m[row * 6 + row];
  }
  return x;
}

/**
 * Divides the field out of an RGBA rectangle of the normalised scan (in place), the rectangle's top-left at
 * page pixel (x0, y0). The gain is taken per 8-pixel step along a row (it changes by far less than a code there).
 */
export function removeLightField(field: LightField, rgba: Uint8Array, w: number, h: number, x0: number, y0: number): void {
  const lin = SRGB8_TO_LINEAR, c = field.coef;
  const su = 2 / field.width, sv = 2 / field.height;
  const inv = new Float64Array(3);
  for (let row = 0; row < h; row++) {
    const v = (y0 + row) * sv - 1;
    for (let x = 0; x < w; x += 8) {
      const u = (x0 + x + 4) * su - 1;
      for (let ch = 0; ch < 3; ch++) {
        const o = ch * 6;
        inv[ch] = 1 / (c[o] + c[o + 1] * u + c[o + 2] * v + c[o + 3] * u * u + c[o + 4] * u * v + c[o + 5] * v * v);
      }
      const end = Math.min(w, x + 8);
      for (let i = (row * w + x) * 4, e = (row * w + end) * 4; i < e; i += 4) {
        rgba[i] = linearToSrgb255Fast(lin[rgba[i]] * inv[0]) + 0.5;
        rgba[i + 1] = linearToSrgb255Fast(lin[rgba[i + 1]] * inv[1]) + 0.5;
        rgba[i + 2] = linearToSrgb255Fast(lin[rgba[i + 2]] * inv[2]) + 0.5;
      }
    }
  }
}
