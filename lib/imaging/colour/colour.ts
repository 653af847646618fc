// Colour arithmetic of the engine: sRGB (IEC 61966-2-1:1999) → CIEXYZ → CIELAB (CIE 15:2004), ΔE*ab 1976 and
// CIEDE2000 (CIE 142-2001, parametric factors kL = kC = kH = 1).
//
// White point and adaptation: sRGB is defined for a D65 white, and Lab here is taken relative to that same
// D65 white (Xn, Yn, Zn from the chromaticity x = 0.3127, y = 0.3290). No chromatic adaptation to D50 is
// applied, so these Lab values are "Lab (D65)", not the D50 Lab of ICC profiles or graphic-arts measurement
// (ISO 13655). For the engine this is deliberate: artwork and scan are compared in the same space, and a
// difference is what matters. A scan is not a calibrated measurement; a spectrophotometer decides on colour.

/** D65 reference white (Y = 1) from the chromaticity x = 0.3127, y = 0.3290 (IEC 61966-2-1). */
export const D65_WHITE: readonly [number, number, number] = [0.3127 / 0.329, 1, (1 - 0.3127 - 0.329) / 0.329];

/**
 * Linear sRGB → XYZ (D65), row-major. Derived at load from the sRGB primaries and white chromaticities of
 * IEC 61966-2-1 rather than the standard's 4-decimal rounding, so that white maps exactly onto D65_WHITE.
 */
export const SRGB_TO_XYZ: readonly number[] = rgbToXyzMatrix(
  [
    [0.64, 0.33],
    [0.3, 0.6],
    [0.15, 0.06],
  ],
  [0.3127, 0.329],
);

/** Primaries and white chromaticities → RGB-to-XYZ matrix with white at Y = 1 (SMPTE RP 177-1993 method). */
export function rgbToXyzMatrix(primaries: number[][], white: [number, number]): number[] {
  const cols = primaries.map(([x, y]) => [x / y, 1, (1 - x - y) / y]);
  const m = [0, 1, 2].map((r) => [cols[0][r], cols[1][r], cols[2][r]]);
  const w = [white[0] / white[1], 1, (1 - white[0] - white[1]) / white[1]];
  const s = solve3(m, w);
  return [0, 1, 2].flatMap((r) => [m[r][0] * s[0], m[r][1] * s[1], m[r][2] * s[2]]);
}

/** Solves m·x = v for a 3 × 3 matrix by Cramer's rule (the matrices here are well conditioned). */
function solve3(m: number[][], v: number[]): number[] {
  const det = (a: number[][]) =>
    a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1]) -
    a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0]) +
    a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0]);
  const d = det(m);
  return [0, 1, 2].map((c) => det(m.map((row, r) => row.map((value, k) => (k === c ? v[r] : value)))) / d);
}

/** sRGB transfer curve, encoded value 0–1 → linear 0–1 (IEC 61966-2-1, section 5.2). */
export function srgbToLinear(v: number): number {
  return v <= 0.04045 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4);
}

/** Inverse sRGB transfer curve, linear 0–1 → encoded 0–1. */
export function linearToSrgb(v: number): number {
  return v <= 0.0031308 ? v * 12.92 : 1.055 * Math.pow(v, 1 / 2.4) - 0.055;
}

/** Linear value of every 8-bit sRGB code, built once: 256 entries. */
export const SRGB8_TO_LINEAR: Float64Array = Float64Array.from({ length: 256 }, (_, i) => srgbToLinear(i / 255));

// Fast encoding of linear light to 0–255 sRGB: a table with linear interpolation. The curve is steepest near
// black, where steps of 1/65536 keep the error under 0.01 of a code; above 1/16 a coarser table holds it there.
const ENC_FINE = Float64Array.from({ length: 4098 }, (_, i) => 255 * linearToSrgb(Math.min(i, 4096) / 65536));
const ENC_COARSE = Float64Array.from({ length: 4098 }, (_, i) => 255 * linearToSrgb(Math.min(i, 4096) / 4096));

/** 255 · linearToSrgb(v) for v in [0, 1] (clamped), within 0.01. */
export function linearToSrgb255Fast(v: number): number {
  if (!(v > 0)) return 0;
  if (v >= 1) return 255;
  if (v < 1 / 16) {
    const x = v * 65536, i = x | 0;
    return ENC_FINE[i] + (ENC_FINE[i + 1] - ENC_FINE[i]) * (x - i);
  }
  const x = v * 4096, i = x | 0;
  return ENC_COARSE[i] + (ENC_COARSE[i + 1] - ENC_COARSE[i]) * (x - i);
}

// CIE 15:2004 constants as exact fractions: ε = (6/29)³, κ = (29/3)³.
const EPSILON = 216 / 24389;
const KAPPA = 24389 / 27;

/** CIELAB companding function f(t) of CIE 15:2004, exact. */
export function labF(t: number): number {
  return t > EPSILON ? Math.cbrt(t) : (KAPPA * t + 16) / 116;
}

// Fast f(t): linear interpolation in a table over t ∈ [0, 1]. The cube root is steepest at t = ε, where the
// interpolation error is ≈ h²/8 · |f''| ≈ 4e-7 in f for h = 1/16384, i.e. < 1e-4 in L* and a*/b*. Values
// above 1 (only slightly out-of-gamut input) take the exact path.
const F_TABLE_STEPS = 16384;
const F_TABLE = Float64Array.from({ length: F_TABLE_STEPS + 2 }, (_, i) => labF(Math.min(i, F_TABLE_STEPS) / F_TABLE_STEPS));

/** CIELAB f(t) from the lookup table; within 1e-6 of `labF` for t ∈ [0, 1]. */
export function labFFast(t: number): number {
  if (t > 1 || t < 0) return labF(t);
  const x = t * F_TABLE_STEPS;
  const i = x | 0;
  const frac = x - i;
  return F_TABLE[i] + (F_TABLE[i + 1] - F_TABLE[i]) * frac;
}

/** XYZ (D65, Y = 1 for white) → CIELAB relative to D65_WHITE. */
export function xyzToLab(x: number, y: number, z: number): [number, number, number] {
  const fx = labF(x / D65_WHITE[0]);
  const fy = labF(y / D65_WHITE[1]);
  const fz = labF(z / D65_WHITE[2]);
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

/** Encoded sRGB components 0–1 → XYZ (D65, Y = 1 for white). */
export function srgbToXyz(r: number, g: number, b: number): [number, number, number] {
  const m = SRGB_TO_XYZ;
  const rl = srgbToLinear(r);
  const gl = srgbToLinear(g);
  const bl = srgbToLinear(b);
  return [m[0] * rl + m[1] * gl + m[2] * bl, m[3] * rl + m[4] * gl + m[5] * bl, m[6] * rl + m[7] * gl + m[8] * bl];
}

/** Encoded sRGB components 0–1 → CIELAB (D65), exact path. */
export function srgbToLab(r: number, g: number, b: number): [number, number, number] {
  const [x, y, z] = srgbToXyz(r, g, b);
  return xyzToLab(x, y, z);
}

/** 8-bit sRGB → CIELAB (D65), exact path. */
export function srgb8ToLab(r: number, g: number, b: number): [number, number, number] {
  return srgbToLab(r / 255, g / 255, b / 255);
}

/**
 * Whole RGBA buffer (8-bit sRGB, alpha ignored) → Float32Array of L, a, b (3 values a pixel).
 * Hot loop is allocation-free: table lookups for the transfer curve and for f(t). Against the exact path the
 * result differs by under 0.001 ΔE*ab (checked in tests/imaging/colour.test.ts); Float32 storage adds ~1e-5.
 * Pass `out` to reuse a buffer of length 3 × pixels.
 */
export function rgbaToLab(rgba: Uint8Array | Uint8ClampedArray, out?: Float32Array): Float32Array {
  if (rgba.length % 4 !== 0) {
    throw new RangeError(`RGBA data length must be a multiple of 4. Got ${rgba.length}.`);
  }
  const pixels = rgba.length / 4;
  const lab = out ?? new Float32Array(pixels * 3);
  if (lab.length !== pixels * 3) {
    throw new RangeError(`Lab buffer must hold ${pixels * 3} values (3 a pixel). Got ${lab.length}.`);
  }
  const lut = SRGB8_TO_LINEAR;
  const m = SRGB_TO_XYZ;
  // Divide by the white once: rows of the matrix pre-scaled by 1/Xn, 1/Yn, 1/Zn.
  const m0 = m[0] / D65_WHITE[0], m1 = m[1] / D65_WHITE[0], m2 = m[2] / D65_WHITE[0];
  const m3 = m[3], m4 = m[4], m5 = m[5];
  const m6 = m[6] / D65_WHITE[2], m7 = m[7] / D65_WHITE[2], m8 = m[8] / D65_WHITE[2];
  for (let p = 0, i = 0, o = 0; p < pixels; p++, i += 4, o += 3) {
    const r = lut[rgba[i]];
    const g = lut[rgba[i + 1]];
    const b = lut[rgba[i + 2]];
    const fx = labFFast(m0 * r + m1 * g + m2 * b);
    const fy = labFFast(m3 * r + m4 * g + m5 * b);
    const fz = labFFast(m6 * r + m7 * g + m8 * b);
    lab[o] = 116 * fy - 16;
    lab[o + 1] = 500 * (fx - fy);
    lab[o + 2] = 200 * (fy - fz);
  }
  return lab;
}

/** ΔE*ab (CIE 1976): Euclidean distance in CIELAB. */
export function deltaE76(l1: number, a1: number, b1: number, l2: number, a2: number, b2: number): number {
  const dl = l1 - l2;
  const da = a1 - a2;
  const db = b1 - b2;
  return Math.sqrt(dl * dl + da * da + db * db);
}

const DEG = Math.PI / 180;
const POW25_7 = Math.pow(25, 7);

/**
 * CIEDE2000 colour difference (CIE 142-2001) with kL = kC = kH = 1, following the implementation notes of
 * G. Sharma, W. Wu, E. N. Dalal, Color Res. Appl. 30(1), 2005: hue angle 0 when a' = b' = 0, mean hue and
 * hue difference by the rules of their eqs. (10)–(14). Allocation-free, for per-pixel use.
 */
export function deltaE00(l1: number, a1: number, b1: number, l2: number, a2: number, b2: number): number {
  const c1 = Math.sqrt(a1 * a1 + b1 * b1);
  const c2 = Math.sqrt(a2 * a2 + b2 * b2);
  const cMean = (c1 + c2) / 2;
  const cMean7 = Math.pow(cMean, 7);
  const g = 0.5 * (1 - Math.sqrt(cMean7 / (cMean7 + POW25_7)));
  const a1p = (1 + g) * a1;
  const a2p = (1 + g) * a2;
  const c1p = Math.sqrt(a1p * a1p + b1 * b1);
  const c2p = Math.sqrt(a2p * a2p + b2 * b2);
  const h1p = hueDeg(b1, a1p);
  const h2p = hueDeg(b2, a2p);

  const dLp = l2 - l1;
  const dCp = c2p - c1p;
  let dhp = 0;
  if (c1p * c2p !== 0) {
    dhp = h2p - h1p;
    if (dhp > 180) dhp -= 360;
    else if (dhp < -180) dhp += 360;
  }
  const dHp = 2 * Math.sqrt(c1p * c2p) * Math.sin((dhp / 2) * DEG);

  const lMean = (l1 + l2) / 2;
  const cMeanP = (c1p + c2p) / 2;
  let hMean = h1p + h2p;
  if (c1p * c2p !== 0) {
    if (Math.abs(h1p - h2p) <= 180) hMean /= 2;
    else hMean = hMean < 360 ? (hMean + 360) / 2 : (hMean - 360) / 2;
  }
  const t =
    1 -
    0.17 * Math.cos((hMean - 30) * DEG) +
    0.24 * Math.cos(2 * hMean * DEG) +
    0.32 * Math.cos((3 * hMean + 6) * DEG) -
    0.2 * Math.cos((4 * hMean - 63) * DEG);
  const dTheta = 30 * Math.exp(-(((hMean - 275) / 25) ** 2));
  const cMeanP7 = Math.pow(cMeanP, 7);
  const rc = 2 * Math.sqrt(cMeanP7 / (cMeanP7 + POW25_7));
  const l50 = (lMean - 50) * (lMean - 50);
  const sl = 1 + (0.015 * l50) / Math.sqrt(20 + l50);
  const sc = 1 + 0.045 * cMeanP;
  const sh = 1 + 0.015 * cMeanP * t;
  const rt = -Math.sin(2 * dTheta * DEG) * rc;

  const tl = dLp / sl;
  const tc = dCp / sc;
  const th = dHp / sh;
  return Math.sqrt(tl * tl + tc * tc + th * th + rt * tc * th);
}

/** Hue angle in degrees 0–360; 0 for a neutral colour (Sharma et al. 2005, eq. 7). */
function hueDeg(b: number, a: number): number {
  if (a === 0 && b === 0) return 0;
  const h = Math.atan2(b, a) / DEG;
  return h < 0 ? h + 360 : h;
}
