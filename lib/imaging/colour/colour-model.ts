// The colour model of one sheet: scan RGB → artwork RGB, as a 33³ lookup table with trilinear interpolation.
// Built from three parts, each fitted on flat-area samples:
// 1. tone curves per channel, from near-neutral samples only (paper, greys, black): there one channel's value
//    fixes the tone, and monotone curves are safe. Fitted on saturated colours, per-channel curves contradict
//    each other (a magenta's green and a black's green) and leave ΔE 5–10 — the lesson of a first trial;
// 2. a smooth second-order polynomial across channels, fitted with every artwork colour weighing the same;
// 3. a local correction at each artwork colour present on the sheet, spread by a Gaussian kernel in scan RGB
//    and fading to nothing away from the sheet's colours. The colours are grouped by ARTWORK colour and each
//    group takes the median of its scan values, so a defect covering a minority of a colour (a shifted patch
//    in a solid) cannot teach the model to hide it.
import { linearToSrgb, srgbToLinear } from "./colour";
import type { SamplePairs } from "./samples";

export const LUT_SIZE = 33;
const STEP = 255 / (LUT_SIZE - 1);
const FEATURES = 10;
/** Kernel width of the local corrections (8-bit scan levels), the weight left to "no local correction", rounds. */
const KERNEL_SIGMA = 10;
const KERNEL_FLOOR = 0.02;
const REFINE_ROUNDS = 3;
const MIN_GROUP = 6;
/** A smooth-area colour farther than this (8-bit, any channel) from every flat colour is a hole (holeGroups). */
const HOLE_DISTANCE = 12;
/**
 * Kernel width of a hole's correction: narrower than a flat colour's, since a press's tint can scan close to
 * an unrelated colour (a sky's cyan tint scanned within 20–30 codes of the grey of a barcode's bars on the
 * second simulator, and a wide kernel turned those greys cyan).
 */
const HOLE_KERNEL_SIGMA = 5;
/** Largest spread of an artwork colour's channels (8-bit) that still counts as neutral. */
const NEUTRAL_SPREAD = 12;
const TONE_BIN = 8;
/** Largest scan − artwork gap (8-bit) of a pair used for the tone curve; press drift stays well inside it. */
const MAX_TONE_GAP = 48;
const MIN_TONE_BIN = 20;

export interface ColourModel {
  /** LUT_SIZE³ × 3 output values (0–255), red index slowest. */
  lut: Float32Array;
  /** Cache of applyColourModel, filled on use (one model belongs to one sheet, one thread). */
  cacheKeys?: Int32Array;
  cacheValues?: Int32Array;
}

export function identityModel(): ColourModel {
  const lut = new Float32Array(LUT_SIZE ** 3 * 3);
  for (let r = 0, o = 0; r < LUT_SIZE; r++)
    for (let g = 0; g < LUT_SIZE; g++)
      for (let b = 0; b < LUT_SIZE; b++, o += 3) { lut[o] = r * STEP; lut[o + 1] = g * STEP; lut[o + 2] = b * STEP; }
  return { lut };
}

/** Slots of the direct-mapped cache of applyColourModel: low-passed scans repeat their colours a lot. */
const CACHE_SLOTS = 1 << 16;

/** Applies the model to RGBA pixels in place (alpha untouched), trilinear in the table. Allocation-free. */
export function applyColourModel(model: ColourModel, rgba: Uint8Array): void {
  mapColours(model, rgba, 4, rgba);
}

/**
 * The model from `src` (3 or 4 bytes a pixel) into RGBA `out` (alpha set to 255 when `src` has none, kept
 * otherwise; `out` may be `src` when both have 4), through a direct-mapped cache of the table's answers.
 */
export function mapColours(model: ColourModel, src: Uint8Array, srcChannels: 3 | 4, out: Uint8Array): void {
  if (out.byteOffset % 4 !== 0) {
    // Word stores need a 4-byte-aligned output (a Buffer slice may not be).
    const aligned = new Uint8Array(out.length);
    mapColours(model, src, srcChannels, aligned);
    out.set(aligned);
    return;
  }
  const lut = model.lut;
  const s = (LUT_SIZE - 1) / 255;
  const sg = LUT_SIZE * 3, sr = LUT_SIZE * LUT_SIZE * 3;
  const keys = (model.cacheKeys ??= new Int32Array(CACHE_SLOTS).fill(-1));
  // Answers as little-endian RGBA words with alpha 255: a cache hit is one load and one store.
  const values = (model.cacheValues ??= new Int32Array(CACHE_SLOTS));
  const out32 = new Int32Array(out.buffer, out.byteOffset, out.length >> 2);
  const n = src.length / srcChannels;
  for (let j = 0, i = 0; j < n; j++, i += srcChannels) {
    const key = (src[i] << 16) | (src[i + 1] << 8) | src[i + 2];
    const slot = Math.imul(key, 0x9e3779b1) >>> 16;
    let word: number;
    if (keys[slot] === key) word = values[slot];
    else {
      const fr = src[i] * s, fg = src[i + 1] * s, fb = src[i + 2] * s;
      let ir = fr | 0, ig = fg | 0, ib = fb | 0;
      if (ir > LUT_SIZE - 2) ir = LUT_SIZE - 2;
      if (ig > LUT_SIZE - 2) ig = LUT_SIZE - 2;
      if (ib > LUT_SIZE - 2) ib = LUT_SIZE - 2;
      const dr = fr - ir, dg = fg - ig, db = fb - ib;
      const o = ir * sr + ig * sg + ib * 3;
      word = -0x1000000;
      for (let c = 0; c < 3; c++) {
        const p = o + c;
        const c00 = lut[p] + (lut[p + 3] - lut[p]) * db;
        const c01 = lut[p + sg] + (lut[p + sg + 3] - lut[p + sg]) * db;
        const c10 = lut[p + sr] + (lut[p + sr + 3] - lut[p + sr]) * db;
        const c11 = lut[p + sr + sg] + (lut[p + sr + sg + 3] - lut[p + sr + sg]) * db;
        const c0 = c00 + (c01 - c00) * dg, c1 = c10 + (c11 - c10) * dg;
        const v = c0 + (c1 - c0) * dr;
        word |= (v <= 0 ? 0 : v >= 255 ? 255 : (v + 0.5) | 0) << (8 * c);
      }
      keys[slot] = key;
      values[slot] = word;
    }
    out32[j] = srcChannels === 3 ? word : (word & 0xffffff) | (src[i + 3] << 24);
  }
}

/** The model's output for one scan colour (0–255 floats). */
export function evaluateModel(model: ColourModel, r: number, g: number, b: number): [number, number, number] {
  const px = new Uint8Array([Math.round(r), Math.round(g), Math.round(b), 255]);
  applyColourModel(model, px);
  return [px[0], px[1], px[2]];
}

export function fitColourModel(pairs: SamplePairs): ColourModel {
  const groups = groupByArtwork(pairs.flatArt, pairs.flatScan, pairs.flatCount);
  const curves = [0, 1, 2].map((c) => fitToneCurve(groups, pairs, c));
  const curved = (r: number, g: number, b: number) => [interp(curves[0], r), interp(curves[1], g), interp(curves[2], b)];
  const points = groups.map((gr) => ({ x: curved(gr.scan[0], gr.scan[1], gr.scan[2]).map((v) => v / 255), y: gr.art.map((v) => v / 255) }));
  const beta = fitPolynomial(points);
  const nodeCurve = [0, 1, 2].map((c) => Float64Array.from({ length: LUT_SIZE }, (_, i) => interp(curves[c], i * STEP) / 255));
  const lut = polynomialTable(nodeCurve, beta);
  // Local corrections: what the table still gets wrong at each artwork colour, spread around its scan colour
  // by a Gaussian kernel and fading to nothing away from the sheet's colours; a few rounds, since neighbouring
  // colours' kernels overlap.
  const reach = Math.ceil((3 * KERNEL_SIGMA) / STEP);
  // Gradients' and pictures' colours that no flat area has add local corrections of their own (not tone curves
  // or the polynomial, which the flat colours fix as before).
  const holes = holeGroups(pairs, groups);
  const local = [...groups, ...holes];
  // The Gaussian kernel is separable: one weight per node along each axis, the same in every round.
  const kernels = local.map((gr, gi) => {
    const sigma = gi < groups.length ? KERNEL_SIGMA : HOLE_KERNEL_SIGMA;
    return gr.scan.map((v) => {
      const centre = Math.round(v / STEP);
      const from = Math.max(0, centre - reach), to = Math.min(LUT_SIZE - 1, centre + reach);
      return { from, w: Float64Array.from({ length: to - from + 1 }, (_, k) => Math.exp(-(((from + k) * STEP - v) ** 2) / (2 * sigma * sigma))) };
    });
  });
  const den = new Float64Array(LUT_SIZE ** 3);
  for (let gi = 0; gi < local.length; gi++) spreadGroup(kernels[gi], den, null, gi);
  const num = new Float64Array(LUT_SIZE ** 3 * 3);
  const res = new Float64Array(local.length * 3);
  for (let round = 0; round < REFINE_ROUNDS; round++) {
    local.forEach((gr, gi) => {
      const predicted = interpolate(lut, gr.scan[0], gr.scan[1], gr.scan[2]);
      for (let c = 0; c < 3; c++) res[gi * 3 + c] = gr.art[c] - predicted[c];
    });
    num.fill(0);
    for (let gi = 0; gi < local.length; gi++) spreadGroup(kernels[gi], num, res, gi);
    addCorrections(lut, num, den);
  }
  for (let i = 0; i < lut.length; i++) lut[i] = Math.min(255, Math.max(0, lut[i]));
  return { lut };
}

/**
 * The table at its nodes: tone curves (sampled once per node index, since nodes fall on whole 8-bit codes only at
 * the ends), then the polynomial, whose terms are those of features() unrolled: the table has 36 000 nodes. A
 * function of its own: inside fitColourModel this loop left most of that function's 27 MB of garbage a sheet
 * (boxed doubles, in a heap-allocation profile), here under 5 MB.
 */
function polynomialTable(nodeCurve: Float64Array[], beta: Float64Array): Float32Array {
  const lut = new Float32Array(LUT_SIZE ** 3 * 3);
  for (let r = 0, o = 0; r < LUT_SIZE; r++) {
    const x0 = nodeCurve[0][r];
    for (let g = 0; g < LUT_SIZE; g++) {
      const x1 = nodeCurve[1][g];
      for (let b = 0; b < LUT_SIZE; b++, o += 3) {
        const x2 = nodeCurve[2][b];
        const phi4 = x0 * x0, phi5 = x1 * x1, phi6 = x2 * x2, phi7 = x0 * x1, phi8 = x0 * x2, phi9 = x1 * x2;
        for (let c = 0; c < 3; c++) {
          const k = c * FEATURES;
          const v = (c === 0 ? x0 : c === 1 ? x1 : x2) + beta[k] + beta[k + 1] * x0 + beta[k + 2] * x1 + beta[k + 3] * x2 +
            beta[k + 4] * phi4 + beta[k + 5] * phi5 + beta[k + 6] * phi6 + beta[k + 7] * phi7 + beta[k + 8] * phi8 + beta[k + 9] * phi9;
          lut[o + c] = v * 255;
        }
      }
    }
  }
  return lut;
}

function addCorrections(lut: Float32Array, num: Float64Array, den: Float64Array): void {
  for (let n = 0; n < den.length; n++) {
    if (den[n] === 0) continue;
    for (let c = 0; c < 3; c++) lut[n * 3 + c] += num[n * 3 + c] / (den[n] + KERNEL_FLOOR);
  }
}

/**
 * One colour group's Gaussian weights over the table's nodes, added to `den` (res null) or, times the group's
 * residuals, to `num` (3 a node). A plain loop, not a callback a node: a double passed to a call is boxed.
 */
function spreadGroup(kernel: { from: number; w: Float64Array }[], into: Float64Array, res: Float64Array | null, gi: number): void {
  const [kr, kg, kb] = kernel;
  const r0 = res ? res[gi * 3] : 0, r1 = res ? res[gi * 3 + 1] : 0, r2 = res ? res[gi * 3 + 2] : 0;
  for (let r = 0; r < kr.w.length; r++)
    for (let g = 0; g < kg.w.length; g++)
      for (let b = 0; b < kb.w.length; b++) {
        const w = kr.w[r] * kg.w[g] * kb.w[b];
        if (w < 1e-4) continue;
        const n = ((kr.from + r) * LUT_SIZE + kg.from + g) * LUT_SIZE + kb.from + b;
        if (res === null) into[n] += w;
        else {
          into[n * 3] += w * r0;
          into[n * 3 + 1] += w * r1;
          into[n * 3 + 2] += w * r2;
        }
      }
}

interface ColourGroup {
  art: number[];
  scan: number[];
  count: number;
}

/**
 * Smooth-area groups whose artwork colour lies farther than HOLE_DISTANCE from every flat group's: the holes in
 * the flat colours' coverage. Near a flat colour the flat group, measured without misregistration, decides.
 */
function holeGroups(pairs: SamplePairs, flat: ColourGroup[]): ColourGroup[] {
  const far = (g: ColourGroup) => flat.every((f) => Math.max(...[0, 1, 2].map((c) => Math.abs(f.art[c] - g.art[c]))) > HOLE_DISTANCE);
  return groupByArtwork(pairs.smoothArt, pairs.smoothScan, pairs.smoothCount).filter(far);
}

/** Samples grouped by artwork colour (6 bits a channel); each group's scan colour is its median. */
function groupByArtwork(artValues: Float32Array, scanValues: Float32Array, n: number): ColourGroup[] {
  // Counting sort of the samples by key: each group's members end up next to each other.
  const keys = new Int32Array(n);
  const starts = new Int32Array((1 << 18) + 1);
  for (let i = 0; i < n; i++) {
    keys[i] = ((artValues[i * 3] >> 2) << 12) | ((artValues[i * 3 + 1] >> 2) << 6) | (artValues[i * 3 + 2] >> 2);
    starts[keys[i] + 1]++;
  }
  for (let k = 1; k < starts.length; k++) starts[k] += starts[k - 1];
  const order = new Int32Array(n), fill = starts.slice(0, -1);
  for (let i = 0; i < n; i++) order[fill[keys[i]]++] = i;
  const groups: ColourGroup[] = [];
  const values = new Float32Array(n);
  for (let k = 0; k < starts.length - 1; k++) {
    const from = starts[k], to = starts[k + 1];
    if (to - from < MIN_GROUP) continue;
    const art = [0, 0, 0], scan = [0, 0, 0];
    for (let c = 0; c < 3; c++) {
      art[c] = groupMedian(artValues, order, from, to, c, values);
      scan[c] = groupMedian(scanValues, order, from, to, c, values);
    }
    groups.push({ art, scan, count: to - from });
  }
  return groups;
}

/** Upper median of channel c over the samples order[from..to), selected in `work`. */
function groupMedian(arr: Float32Array, order: Int32Array, from: number, to: number, c: number, work: Float32Array): number {
  const n = to - from;
  for (let j = 0; j < n; j++) work[j] = arr[order[from + j] * 3 + c];
  return select(work, n, n >> 1);
}

/** The k-th smallest of v[0..n) (Hoare's selection, in place): the upper median for k = n >> 1, without a sort. */
function select(v: Float32Array, n: number, k: number): number {
  let lo = 0, hi = n - 1;
  while (lo < hi) {
    const pivot = v[(lo + hi) >> 1];
    let i = lo, j = hi;
    while (i <= j) {
      while (v[i] < pivot) i++;
      while (v[j] > pivot) j--;
      if (i <= j) {
        const t = v[i]; v[i] = v[j]; v[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return v[k];
  }
  return v[k];
}

/** Upper median of a typed array (reordered in place). */
function median(v: Float32Array): number {
  return select(v, v.length, v.length >> 1);
}

/** Trilinear value of the table at a scan colour (0–255 floats), unclamped. */
function interpolate(lut: Float32Array, r: number, g: number, b: number): number[] {
  const f = [r, g, b].map((v) => Math.min(LUT_SIZE - 1.000001, Math.max(0, v / STEP)));
  const i = f.map((v) => Math.min(LUT_SIZE - 2, Math.floor(v)));
  const d = f.map((v, k) => v - i[k]);
  const out = [0, 0, 0];
  for (let corner = 0; corner < 8; corner++) {
    const cr = corner >> 2, cg = (corner >> 1) & 1, cb = corner & 1;
    const w = (cr ? d[0] : 1 - d[0]) * (cg ? d[1] : 1 - d[1]) * (cb ? d[2] : 1 - d[2]);
    const o = (((i[0] + cr) * LUT_SIZE + i[1] + cg) * LUT_SIZE + i[2] + cb) * 3;
    for (let c = 0; c < 3; c++) out[c] += w * lut[o + c];
  }
  return out;
}

function interp(curve: Float32Array, v: number): number {
  const i = Math.min(254, Math.max(0, Math.floor(v)));
  const f = Math.min(1, Math.max(0, v - i));
  return curve[i] + (curve[i + 1] - curve[i]) * f;
}

function features(r: number, g: number, b: number): number[] {
  return [1, r, g, b, r * r, g * g, b * b, r * g, r * b, g * b];
}

/**
 * Tone curve of one channel (0–255 → 0–255) from near-neutral artwork (paper, greys, black text): the median
 * artwork value per scan code over window means of the whole covered area (text edges included, so the
 * mid-tones are known), each near-neutral flat group's median, and the 0.2 and 99.8 percentiles of the
 * covered area as anchors; the curve is then a smooth power law through them (powerCurve). Medians keep stray
 * marks (a pen dot on white) out of the curve.
 */
function fitToneCurve(groups: ColourGroup[], pairs: SamplePairs, c: number): Float32Array {
  const points: { x: number; y: number; w: number }[] = [];
  for (const g of groups) {
    if (Math.max(...g.art) - Math.min(...g.art) > NEUTRAL_SPREAD) continue;
    points.push({ x: g.scan[c], y: g.art[c], w: 4 * g.count });
  }
  // Bins of TONE_BIN scan codes: single codes hold too few edge samples and make the curve steep by chance.
  // Each bin's pairs are gathered into one typed array per side (a counting sort), then take their medians.
  const bins = Math.ceil(256 / TONE_BIN);
  const a = pairs.allArt, s = pairs.allScan, n = pairs.allCount;
  const binOf = new Int32Array(n);
  const starts = new Int32Array(bins + 1);
  for (let i = 0; i < n; i++) {
    const r = a[i * 3], g = a[i * 3 + 1], b = a[i * 3 + 2];
    const sv = s[i * 3 + c];
    // A pair far apart is a mark on the sheet (or a stray edge), not tone: keep it out of the curve.
    if (Math.max(r, g, b) - Math.min(r, g, b) > NEUTRAL_SPREAD || Math.abs(sv - a[i * 3 + c]) > MAX_TONE_GAP) {
      binOf[i] = -1;
      continue;
    }
    binOf[i] = Math.min(bins - 1, Math.max(0, Math.floor(sv / TONE_BIN)));
    starts[binOf[i] + 1]++;
  }
  for (let k = 0; k < bins; k++) starts[k + 1] += starts[k];
  const binScan = new Float32Array(starts[bins]), binArt = new Float32Array(starts[bins]);
  const fill = starts.slice(0, bins);
  for (let i = 0; i < n; i++) {
    if (binOf[i] < 0) continue;
    const at = fill[binOf[i]]++;
    binScan[at] = s[i * 3 + c];
    binArt[at] = a[i * 3 + c];
  }
  for (let k = 0; k < bins; k++) {
    const from = starts[k], count = starts[k + 1] - from;
    if (count < MIN_TONE_BIN) continue;
    points.push({ x: median(binScan.subarray(from, from + count)), y: median(binArt.subarray(from, from + count)), w: count });
  }
  const total = points.reduce((t, p) => t + p.w, 0);
  const flatLo = Math.min(256, ...points.map((p) => p.x)), flatHi = Math.max(-1, ...points.map((p) => p.x));
  const [scanLo, scanHi] = percentiles(pairs.allScan, c, pairs.allCount);
  const [artLo, artHi] = percentiles(pairs.allArt, c, pairs.allCount);
  const anchorWeight = Math.max(1, total * 0.002);
  if (scanLo < flatLo - 8) points.push({ x: scanLo, y: artLo, w: anchorWeight });
  if (scanHi > flatHi + 8) points.push({ x: scanHi, y: artHi, w: anchorWeight });
  return powerCurve(points);
}

/**
 * The smooth tone curve through the points, in linear light: artwork = a + b · scan^γ (least squares, γ by a
 * search over 0.5–2). Three parameters follow a press's density change, paper white and a scanner's gamma,
 * and cannot turn steep by chance where edge samples are sparse, as a free-form curve would.
 */
function powerCurve(points: { x: number; y: number; w: number }[]): Float32Array {
  const xs = points.map((p) => srgbToLinear(Math.min(255, Math.max(0, p.x)) / 255));
  const ys = points.map((p) => srgbToLinear(Math.min(255, Math.max(0, p.y)) / 255));
  let best = { err: Infinity, a: 0, b: 1, gamma: 1 };
  for (let gamma = 0.5; gamma <= 2.0001; gamma += 0.01) {
    let sw = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (let i = 0; i < points.length; i++) {
      const w = points[i].w, x = xs[i] ** gamma, y = ys[i];
      sw += w; sx += w * x; sy += w * y; sxx += w * x * x; sxy += w * x * y;
    }
    const det = sw * sxx - sx * sx;
    if (!(Math.abs(det) > 1e-12)) continue;
    const b = (sw * sxy - sx * sy) / det, a = (sy - b * sx) / sw;
    if (!(b > 0)) continue;
    let err = 0;
    for (let i = 0; i < points.length; i++) err += points[i].w * (a + b * xs[i] ** gamma - ys[i]) ** 2;
    if (err < best.err) best = { err, a, b, gamma };
  }
  const curve = new Float32Array(256);
  for (let v = 0; v < 256; v++) {
    const lin = best.a + best.b * srgbToLinear(v / 255) ** best.gamma;
    curve[v] = 255 * linearToSrgb(Math.min(1, Math.max(0, lin)));
  }
  return curve;
}

/** The 0.2 and 99.8 percentiles of one channel (values 0–255), from a histogram of 1/16-code bins. */
function percentiles(values: Float32Array, c: number, n: number): [number, number] {
  if (n === 0) return [0, 255];
  const BINS = 4096;
  const hist = new Uint32Array(BINS);
  for (let i = 0; i < n; i++) hist[Math.min(BINS - 1, Math.max(0, Math.round(values[i * 3 + c] * 16)))]++;
  const at = (rank: number) => {
    let seen = 0;
    for (let bin = 0; bin < BINS; bin++) if ((seen += hist[bin]) > rank) return bin / 16;
    return 255;
  };
  return [at(Math.floor(n * 0.002)), at(Math.min(n - 1, Math.floor(n * 0.998)))];
}

/**
 * Second-order polynomial correction (10 terms a channel) by least squares over the colour groups, each
 * weighing the same, with neutral anchor points (grey stays grey) and a ridge towards "no correction".
 */
function fitPolynomial(points: { x: number[]; y: number[] }[]): Float64Array {
  const ata = new Float64Array(FEATURES * FEATURES);
  const atb = new Float64Array(FEATURES * 3);
  const add = (x: number[], y: number[], w: number) => {
    const phi = features(x[0], x[1], x[2]);
    for (let j = 0; j < FEATURES; j++) {
      for (let k = 0; k < FEATURES; k++) ata[j * FEATURES + k] += w * phi[j] * phi[k];
      for (let c = 0; c < 3; c++) atb[c * FEATURES + j] += w * phi[j] * (y[c] - x[c]);
    }
  };
  for (const p of points) add(p.x, p.y, 1);
  for (let v = 0; v <= 1.0001; v += 0.125) add([v, v, v], [v, v, v], 0.2);
  for (let j = 0; j < FEATURES; j++) ata[j * FEATURES + j] += 0.05;
  const beta = new Float64Array(FEATURES * 3);
  for (let c = 0; c < 3; c++) beta.set(solve(ata, atb.subarray(c * FEATURES, (c + 1) * FEATURES), FEATURES), c * FEATURES);
  return beta;
}

/** Solves A·x = b (n × n) by Gaussian elimination with partial pivoting. */
function solve(aIn: Float64Array, bIn: Float64Array, n: number): Float64Array {
  const a = Float64Array.from(aIn), b = Float64Array.from(bIn);
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r * n + col]) > Math.abs(a[pivot * n + col])) pivot = r;
    for (let k = 0; k < n; k++) [a[col * n + k], a[pivot * n + k]] = [a[pivot * n + k], a[col * n + k]];
    [b[col], b[pivot]] = [b[pivot], b[col]];
    const d = a[col * n + col];
    if (Math.abs(d) < 1e-12) continue;
    for (let r = col + 1; r < n; r++) {
      const f = a[r * n + col] / d;
      for (let k = col; k < n; k++) a[r * n + k] -= f * a[col * n + k];
      b[r] -= f * b[col];
    }
  }
  const x = new Float64Array(n);
  for (let r = n - 1; r >= 0; r--) {
    let s = b[r];
    for (let k = r + 1; k < n; k++) s -= a[r * n + k] * x[k];
    x[r] = Math.abs(a[r * n + r]) < 1e-12 ? 0 : s / a[r * n + r];
  }
  return x;
}
