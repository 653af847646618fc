// ICC profiles of the matrix/TRC kind (ICC.1:2010 / ISO 15076-1, section 8.3: rXYZ, gXYZ, bXYZ colorants and
// rTRC, gTRC, bTRC tone curves) and conversion of pixels in such a space to 8-bit sRGB.
//
// Why our own: sharp 0.35.5 returns the stored values of a 16-bit TIFF with a non-sRGB profile in raw output
// (tests/imaging/load-scan.test.ts shows it), so a wide-gamut scan would look shifted everywhere. Conversion is
// relative colorimetric with clipping: profile → PCS XYZ (D50) → Bradford to D65 → linear sRGB → sRGB curve.
import { D65_WHITE, linearToSrgb, SRGB_TO_XYZ } from "../colour/colour";

/** ICC PCS illuminant D50 (ICC.1:2010, 7.2.16), as stored in profiles (s15Fixed16 rounding). */
export const PCS_D50: readonly [number, number, number] = [0.9642, 1, 0.8249];

export type ToneCurve = { kind: "gamma"; gamma: number } | { kind: "table"; table: Float64Array } | { kind: "parametric"; type: number; p: number[] };

export interface MatrixProfile {
  description: string;
  /** Columns rXYZ, gXYZ, bXYZ (PCS, D50), row-major 3 × 3: XYZ = M · rgb(linear). */
  toPcs: number[];
  curves: [ToneCurve, ToneCurve, ToneCurve];
}

export type ProfileKind =
  | { kind: "matrix"; profile: MatrixProfile }
  /** Anything else (LUT-based, CMYK, grey, damaged): left to the image library. */
  | { kind: "other"; description: string; reason: string };

/** Reads an ICC profile; a matrix/TRC RGB display or input profile without A2B tables comes back as "matrix". */
export function parseIccProfile(icc: Uint8Array): ProfileKind {
  const view = new DataView(icc.buffer, icc.byteOffset, icc.byteLength);
  const sig = (o: number) => String.fromCharCode(icc[o], icc[o + 1], icc[o + 2], icc[o + 3]);
  if (icc.length < 132 || sig(36) !== "acsp") return { kind: "other", description: "", reason: "not an ICC profile" };
  const tags = new Map<string, { offset: number; size: number }>();
  const count = view.getUint32(128);
  for (let i = 0; i < count && 132 + i * 12 + 12 <= icc.length; i++) {
    const o = 132 + i * 12;
    const offset = view.getUint32(o + 4);
    const size = view.getUint32(o + 8);
    if (offset + size <= icc.length) tags.set(sig(o), { offset, size });
  }
  const description = readDescription(icc, view, tags.get("desc"));
  if (sig(16) !== "RGB " || sig(20) !== "XYZ ") {
    return { kind: "other", description, reason: `colour space ${sig(16).trim()} with PCS ${sig(20).trim()}` };
  }
  // ICC.1:2010, 8.3: an A2B0 table takes precedence over the matrix/TRC model when both are present.
  if (tags.has("A2B0") || tags.has("A2B1")) return { kind: "other", description, reason: "LUT-based profile" };
  try {
    const xyz = ["rXYZ", "gXYZ", "bXYZ"].map((t) => readXyz(view, sig, tags.get(t)));
    const curves = ["rTRC", "gTRC", "bTRC"].map((t) => readCurve(view, sig, tags.get(t))) as [ToneCurve, ToneCurve, ToneCurve];
    const toPcs = [0, 1, 2].flatMap((r) => [xyz[0][r], xyz[1][r], xyz[2][r]]);
    return { kind: "matrix", profile: { description, toPcs, curves } };
  } catch (err) {
    return { kind: "other", description, reason: (err as Error).message };
  }
}

type Tag = { offset: number; size: number } | undefined;

function readXyz(view: DataView, sig: (o: number) => string, tag: Tag): number[] {
  if (!tag || sig(tag.offset) !== "XYZ " || tag.size < 20) throw new Error("missing colorant tag");
  return [0, 1, 2].map((i) => view.getInt32(tag.offset + 8 + i * 4) / 65536);
}

function readCurve(view: DataView, sig: (o: number) => string, tag: Tag): ToneCurve {
  if (!tag) throw new Error("missing tone curve");
  const o = tag.offset;
  if (sig(o) === "curv") {
    const n = view.getUint32(o + 8);
    if (n === 0) return { kind: "gamma", gamma: 1 };
    if (n === 1) return { kind: "gamma", gamma: view.getUint16(o + 12) / 256 };
    if (12 + 2 * n > tag.size) throw new Error("tone curve table cut short");
    return { kind: "table", table: Float64Array.from({ length: n }, (_, i) => view.getUint16(o + 12 + 2 * i) / 65535) };
  }
  if (sig(o) === "para") {
    const type = view.getUint16(o + 8);
    const counts = [1, 3, 4, 5, 7];
    if (type > 4) throw new Error(`parametric curve type ${type}`);
    return { kind: "parametric", type, p: Array.from({ length: counts[type] }, (_, i) => view.getInt32(o + 12 + 4 * i) / 65536) };
  }
  throw new Error(`tone curve of type ${sig(o)}`);
}

function readDescription(icc: Uint8Array, view: DataView, tag: Tag): string {
  if (!tag) return "";
  const o = tag.offset;
  const type = String.fromCharCode(...icc.subarray(o, o + 4));
  if (type === "desc") {
    const n = view.getUint32(o + 8);
    return Buffer.from(icc.subarray(o + 12, o + 12 + Math.max(0, n - 1))).toString("latin1");
  }
  if (type === "mluc" && view.getUint32(o + 8) > 0) {
    const len = view.getUint32(o + 20);
    const at = view.getUint32(o + 24);
    const bytes = icc.subarray(o + at, o + at + len);
    let s = "";
    for (let i = 0; i + 1 < bytes.length; i += 2) s += String.fromCharCode((bytes[i] << 8) | bytes[i + 1]);
    return s;
  }
  return "";
}

/** Tone curve: encoded 0–1 → linear 0–1 (ICC.1:2010, 10.6 curveType and 10.18 parametricCurveType). */
export function evalCurve(c: ToneCurve, x: number): number {
  if (c.kind === "gamma") return Math.pow(x, c.gamma);
  if (c.kind === "table") {
    const pos = x * (c.table.length - 1);
    const i = Math.min(c.table.length - 2, Math.floor(pos));
    return c.table[i] + (c.table[i + 1] - c.table[i]) * (pos - i);
  }
  const [g, a = 1, b = 0, cc = 0, d = 0, e = 0, f = 0] = c.p;
  switch (c.type) {
    case 0:
      return Math.pow(x, g);
    case 1:
      return x >= -b / a ? Math.pow(a * x + b, g) : 0;
    case 2:
      return x >= -b / a ? Math.pow(a * x + b, g) + cc : cc;
    case 3:
      return x >= d ? Math.pow(a * x + b, g) : cc * x;
    default:
      return x >= d ? Math.pow(a * x + b, g) + e : cc * x + f;
  }
}

// Bradford cone response matrix (K. M. Lam, 1985; as used for chromatic adaptation in ICC.1:2010 Annex E).
const BRADFORD = [0.8951, 0.2664, -0.1614, -0.7502, 1.7135, 0.0367, 0.0389, -0.0685, 1.0296];

/** Profile-linear RGB → linear sRGB: inverse(sRGB→XYZ D65) · Bradford(D50→D65) · profile colorants. */
export function profileToLinearSrgb(profile: MatrixProfile): number[] {
  // Adapt from the white the colorants actually sum to (PCS D50 up to the profile's rounding), so that the
  // profile's white lands exactly on sRGB white.
  const m = profile.toPcs;
  const white = [m[0] + m[1] + m[2], m[3] + m[4] + m[5], m[6] + m[7] + m[8]];
  const adapt = mul(inverse(BRADFORD), mul(diagonalRatio(BRADFORD, white, D65_WHITE), BRADFORD));
  return mul(inverse([...SRGB_TO_XYZ]), mul(adapt, profile.toPcs));
}

/** True when the profile describes sRGB closely enough that conversion would change no 8-bit value. */
export function isSrgbLike(profile: MatrixProfile): boolean {
  const m = profileToLinearSrgb(profile);
  const identity = [1, 0, 0, 0, 1, 0, 0, 0, 1];
  if (m.some((v, i) => Math.abs(v - identity[i]) > 0.002)) return false;
  for (const c of profile.curves) {
    for (let i = 1; i < 16; i++) {
      const x = i / 16;
      if (Math.abs(linearToSrgb(evalCurve(c, x)) - x) > 0.3 / 255) return false;
    }
  }
  return true;
}

/**
 * Converts chunky RGB samples (8- or 16-bit, `channels` a pixel, extra channels ignored) in the profile's space
 * into 8-bit sRGB RGBA with opaque alpha. Tone curves become tables over the input codes; the sRGB encoding is
 * a table over 1/65536 steps of linear light (error < 0.1 of an 8-bit level).
 */
export function convertToSrgb(
  samples: Uint8Array | Uint16Array,
  channels: number,
  profile: MatrixProfile,
  out: Uint8Array,
): Uint8Array {
  const codes = samples instanceof Uint16Array ? 65536 : 256;
  const maxCode = codes - 1;
  const curves = profile.curves.map((c) => Float32Array.from({ length: codes }, (_, i) => evalCurve(c, i / maxCode)));
  const [m0, m1, m2, m3, m4, m5, m6, m7, m8] = profileToLinearSrgb(profile);
  const steps = 65536;
  const encode = Uint8Array.from({ length: steps + 1 }, (_, i) => Math.round(linearToSrgb(i / steps) * 255));
  const [cr, cg, cb] = curves;
  const pixels = samples.length / channels;
  const clamp = (v: number) => (v <= 0 ? 0 : v >= 1 ? steps : (v * steps + 0.5) | 0);
  for (let p = 0, i = 0, o = 0; p < pixels; p++, i += channels, o += 4) {
    const r = cr[samples[i]];
    const g = cg[samples[i + 1]];
    const b = cb[samples[i + 2]];
    out[o] = encode[clamp(m0 * r + m1 * g + m2 * b)];
    out[o + 1] = encode[clamp(m3 * r + m4 * g + m5 * b)];
    out[o + 2] = encode[clamp(m6 * r + m7 * g + m8 * b)];
    out[o + 3] = 255;
  }
  return out;
}

function mul(a: number[], b: number[]): number[] {
  const r = new Array<number>(9);
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) r[i * 3 + j] = a[i * 3] * b[j] + a[i * 3 + 1] * b[3 + j] + a[i * 3 + 2] * b[6 + j];
  return r;
}

function inverse(m: number[]): number[] {
  const [a, b, c, d, e, f, g, h, i] = m;
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g;
  const det = a * A + b * B + c * C;
  return [A, -(b * i - c * h), b * f - c * e, B, a * i - c * g, -(a * f - c * d), C, -(a * h - b * g), a * e - b * d].map((v) => v / det);
}

/** Von Kries scaling in the cone space of `cone`: diag(cone·dst / cone·src). */
function diagonalRatio(cone: number[], src: readonly number[], dst: readonly number[]): number[] {
  const s = [0, 1, 2].map((r) => cone[r * 3] * src[0] + cone[r * 3 + 1] * src[1] + cone[r * 3 + 2] * src[2]);
  const d = [0, 1, 2].map((r) => cone[r * 3] * dst[0] + cone[r * 3 + 1] * dst[1] + cone[r * 3 + 2] * dst[2]);
  return [d[0] / s[0], 0, 0, 0, d[1] / s[1], 0, 0, 0, d[2] / s[2]];
}
