// COMPARE: difference of the aligned, normalised, low-passed pair, band by band.
//
// 1. pixelmatch 7 (YIQ metric, Kotsarenko & Ramos 2010) is the fast structural screen: only the pixels it
//    marks are examined further.
// 2. CIELAB with a registration tolerance: a pixel counts only if its scan colour matches no artwork pixel
//    within the tolerance radius AND its artwork colour matches no scan pixel within it. One direction alone
//    misses a removed stroke thinner than the radius; both together forgive a sub-pixel shift along edges.
// 3. An edge allowance in proportion to the artwork's local contrast (see EDGE_ALLOWANCE), and a smaller one
//    for the structural check of small print (EDGE_ALLOWANCE_STRUCTURAL).
// 4. ΔE00 (CIE 142-2001) is computed for the best-matching pair only, after a ΔE*ab bound: ΔE00 never
//    exceeded 1.39 × ΔE*ab over 300 000 random sRGB pairs, so ΔE*ab < low / 1.4 cannot reach `low`.
import pixelmatch from "pixelmatch";
import { D65_WHITE, deltaE00, labFFast, SRGB8_TO_LINEAR, SRGB_TO_XYZ } from "../colour/colour";
import type { PreparedRect } from "./prepared";

/** Class of a flagged pixel, by whether the scan lies farther from paper white than the artwork. */
export const PIXEL_EXTRA_INK = 1;
export const PIXEL_MISSING_INK = 2;
export const PIXEL_COLOUR_SHIFT = 3;
/** Bit of BandDifference.structural: the artwork has type or linework within the reach of this pixel. */
export const PIXEL_ON_LINEWORK = 4;

const DE00_OVER_DEAB = 1.4;
/**
 * ΔE00 forgiven per unit of the artwork's local contrast (ΔE*ab extent within the registration radius plus
 * the low-pass's reach). Along
 * edges, scanner optics, JPEG chroma subsampling and the colour model's error on blended colours leave
 * 5–15 % of the edge contrast; a missing or extra stroke differs by about the whole contrast.
 */
export const EDGE_ALLOWANCE = 0.15;
/**
 * The same for a sideways move in colour (hue or chroma at the same ink): along edges that is what JPEG's
 * subsampled chroma and a scanner's colour fringes produce, while a true colour shift sits in a flat area,
 * where the allowance is nil.
 */
const EDGE_ALLOWANCE_COLOUR = 0.35;
/**
 * What is forgiven per unit of the contrast a little farther out (prepared.ts, BLEED_PX), for an edge's error
 * reaching past the low-pass: a JPEG scan's chroma, kept at half resolution, bleeds from strong edges into
 * solids, and a scanner's blur has longer tails than the Gaussian the artwork is given. Set on simulated q92
 * scans: the black patch of the colour bar showed colour shifts up to ΔE00 11 a millimetre from its yellow and red
 * neighbours, and with the strict profile's 1-pixel registration radius the tint beside 20 pt type showed ΔE00
 * 3–4.5 (15 false findings on 3 clean sheets, none with this). Ink gets less: at 0.05 a changed word beside type
 * was missed on one sheet of ten.
 */
const BLEED_ALLOWANCE_COLOUR = 0.08;
const BLEED_ALLOWANCE_INK = 0.03;
/**
 * The edge allowance of the structural check: a changed glyph in small print adds ink where the artwork has
 * none AND removes it where it has some, over several strokes, while a scan's softness along type only fills
 * in or only thins. Pixels within this smaller allowance are counted apart (BandDifference.structural) and a
 * region they form counts only when it holds both kinds (findings.ts).
 */
const EDGE_ALLOWANCE_STRUCTURAL = 0.08;
/** ΔE*ab of the artwork's local contrast from which a pixel lies near type (a flat ground keeps the minimum area). */
const STRUCTURAL_MIN_CONTRAST = 20;
/** Smallest YIQ distance per ΔE00² seen on 1 % of random sRGB pairs (measured; the worst case was 0.077). */
const YIQ_PER_DE00_SQUARED = 0.2;
const YIQ_MAX = 35215;

export interface CompareSettings {
  /** Pixel level of the two-level flagging: ΔE00 at or above this is flagged. */
  lowDeltaE00: number;
  /** Second level (the profile's ΔE00): the screen is set to pass every pixel that could reach it. */
  peakDeltaE00: number;
  /** Registration tolerance in whole pixels (square neighbourhood). */
  radiusPx: number;
  /** Compute the tolerant ΔE00 of every pixel (difference crops) instead of screening. */
  everyPixel?: boolean;
  /** ΔE00 forgiven per unit of local contrast for ink (default EDGE_ALLOWANCE; allowances.ts sets it per sheet). */
  edgeAllowance?: number;
  /** ΔE00 forgiven on flat areas, by the artwork's tone (TONE_BINS; allowances.ts): the scan's own noise there. */
  flatAllowance?: Float32Array;
  /** Filled with what each pixel would need forgiven (allowances.ts), when given. */
  sample?: SheetSample;
}

/** Of some bands: what each edge pixel, and each flat pixel by tone, would need forgiven not to be flagged. */
export interface SheetSample {
  /** Inspected pixels with local contrast ≥ EDGE_MIN_CONTRAST. */
  edgePixels: number;
  /** Edge pixels by allowance needed, in steps of 1 / EDGE_SAMPLE_STEPS (the last bin holds all beyond). */
  edgeNeeded: Float64Array;
  /** Inspected flat pixels (local contrast below EDGE_MIN_CONTRAST) by tone bin. */
  flatPixels: Float64Array;
  /** Flat pixels by tone bin (rows of FLAT_SAMPLE_STEPS + 1) and tolerant ΔE00, in steps of 1 / FLAT_SAMPLE_RESOLUTION. */
  flatDeltaE: Float64Array;
}

/**
 * Local contrast (ΔE*ab) from which a pixel is an edge pixel: below, its tolerance is the scan's noise on flat
 * areas; at and above, the screens skip only pixels that could need less than EDGE_ALLOWANCE.
 */
export const EDGE_MIN_CONTRAST = 10;
export const EDGE_SAMPLE_STEPS = 100;
/** Tone bins of flat areas, by the artwork's low-passed luma (R + 2G + B) / 4: paper white apart from tints and solids. */
export const TONE_BINS = 8;
export const FLAT_SAMPLE_RESOLUTION = 10;
export const FLAT_SAMPLE_STEPS = 300;

export function newSheetSample(): SheetSample {
  return {
    edgePixels: 0,
    edgeNeeded: new Float64Array(EDGE_SAMPLE_STEPS + 1),
    flatPixels: new Float64Array(TONE_BINS),
    flatDeltaE: new Float64Array(TONE_BINS * (FLAT_SAMPLE_STEPS + 1)),
  };
}

function toneBin(rgba: Uint8Array, pix: number): number {
  const o = pix * 4;
  return ((rgba[o] + 2 * rgba[o + 1] + rgba[o + 2]) * TONE_BINS) >> 10;
}

/** One band over the same rows of both images (core plus halo), full band width. */
export interface BandPair {
  width: number;
  rows: number;
  /** The prepared artwork over the band (prepared.ts): low-pass, CIELAB, local contrast. */
  art: PreparedRect;
  /** Low-passed, normalised scan, RGBA. */
  scan: Uint8Array;
  /** First core row inside the band and number of core rows (the halo lies around them). */
  coreY: number;
  coreRows: number;
  /** 1 where a core pixel is inspected (covered, not excluded): coreRows × width. */
  inspect: Uint8Array;
}

/** Per core pixel: tolerant ΔE00 (0 where not flagged), its score and its PIXEL_* class. */
export interface BandDifference {
  deltaE: Float32Array;
  /** ΔE00 less the edge allowance: what the two flagging levels test. */
  score: Float32Array;
  kind: Uint8Array;
  /**
   * PIXEL_EXTRA_INK or PIXEL_MISSING_INK (low two bits) where the pixel reaches the second level within the
   * structural allowance, plus PIXEL_ON_LINEWORK where the artwork has type or linework around it.
   */
  structural: Uint8Array;
  /** Scan less artwork in CIELAB at the pixel itself (L*, a*, b*; 3 a pixel, rounded, ±127): whether a region's differences agree in direction. */
  shift: Int8Array;
  flagged: number;
  candidates: number;
  /** Time spent in pixelmatch's screen (ms). */
  screenMs: number;
}

/** Reusable buffers of the comparison, used by one inspection at a time (bands.ts lends them; never shared between threads). */
export class CompareScratch {
  private screen = new Uint8Array(0);
  private results = { deltaE: new Float32Array(0), score: new Float32Array(0), kind: new Uint8Array(0), structural: new Uint8Array(0), shift: new Int8Array(0) };
  /** Direct-mapped cache of CIELAB by 24-bit RGB: low-passed artwork and scan repeat their colours a lot. */
  readonly labKeys = new Int32Array(LAB_CACHE_SLOTS).fill(-1);
  readonly labValues = new Float32Array(LAB_CACHE_SLOTS * 3);

  private inspect = new Uint8Array(0);
  /** The band's inspect mask (zeroed), overwritten by the next band. */
  inspectMask(n: number): Uint8Array {
    if (this.inspect.length < n) this.inspect = new Uint8Array(n);
    const out = this.inspect.subarray(0, n);
    out.fill(0);
    return out;
  }

  private normalised = new Uint8Array(0);
  /** The band's normalised scan (RGBA), overwritten by the next band. */
  normalisedScan(n: number): Uint8Array {
    if (this.normalised.length < n) this.normalised = new Uint8Array(n);
    return this.normalised.subarray(0, n);
  }

  /**
   * pixelmatch's output with every alpha byte 0. The comparison clears each alpha it reads, so the buffer comes
   * back clean without a page-sized fill (set screenClean once it has); pixelmatch reads nothing of it.
   */
  screenBuffer(n: number): Uint8Array {
    if (this.screen.length < n) this.screen = new Uint8Array(n);
    else if (!this.screenClean) this.screen.fill(0);
    this.screenClean = false;
    return this.screen.subarray(0, n);
  }
  screenClean = true;

  /**
   * Zeroed per-pixel result arrays, valid until the next band: the caller consumes them before asking again.
   * Only the pixels the last band wrote (see wrote) are zeroed again: a handful, not four page-sized fills.
   */
  result(n: number): { deltaE: Float32Array; score: Float32Array; kind: Uint8Array; structural: Uint8Array; shift: Int8Array } {
    let r = this.results;
    if (r.deltaE.length < n) {
      r = this.results = { deltaE: new Float32Array(n), score: new Float32Array(n), kind: new Uint8Array(n), structural: new Uint8Array(n), shift: new Int8Array(n * 3) };
    } else if (this.writtenCount > this.written.length) {
      r.deltaE.fill(0);
      r.score.fill(0);
      r.kind.fill(0);
      r.structural.fill(0);
      r.shift.fill(0);
    } else {
      for (let j = 0; j < this.writtenCount; j++) {
        const i = this.written[j];
        r.deltaE[i] = 0;
        r.score[i] = 0;
        r.kind[i] = 0;
        r.structural[i] = 0;
        r.shift[i * 3] = r.shift[i * 3 + 1] = r.shift[i * 3 + 2] = 0;
      }
    }
    this.writtenCount = 0;
    return { deltaE: r.deltaE.subarray(0, n), score: r.score.subarray(0, n), kind: r.kind.subarray(0, n), structural: r.structural.subarray(0, n), shift: r.shift.subarray(0, n * 3) };
  }
  private written = new Int32Array(1 << 16);
  private writtenCount = 0;
  /** Records pixel i as written in the result arrays; past the list's length, the next band zeroes them whole. */
  wrote(i: number): void {
    if (this.writtenCount < this.written.length) this.written[this.writtenCount] = i;
    this.writtenCount++;
  }
}

const LAB_CACHE_SLOTS = 1 << 16;

/** The difference of one band; its arrays belong to `scratch` and stay valid until its next band. */
export function compareBand(band: BandPair, settings: CompareSettings, scratch: CompareScratch): BandDifference {
  const { width, rows, coreY, coreRows, art } = band;
  const n = width * coreRows;
  const { deltaE, kind, score, structural, shift } = scratch.result(n);
  if (art.low.length !== width * rows * 4 || band.scan.length !== width * rows * 4 || band.inspect.length !== n) {
    throw new RangeError(`Band buffers do not match ${width} × ${rows} px with ${coreRows} core rows.`);
  }
  const low = settings.lowDeltaE00;
  const coreStart = coreY * width * 4;
  let screen: Uint8Array | null = null;
  let screenMs = 0;
  if (!settings.everyPixel && !settings.sample) {
    screen = scratch.screenBuffer(n * 4);
    // Set on the second level: a region is kept only for pixels that reach it, and set on the first the
    // screen would pass nearly every pixel of a noisy scan.
    const peak = settings.peakDeltaE00;
    const threshold = Math.sqrt((YIQ_PER_DE00_SQUARED * peak * peak) / YIQ_MAX);
    const screenStarted = performance.now();
    const count = pixelmatch(
      art.low.subarray(coreStart, coreStart + n * 4),
      band.scan.subarray(coreStart, coreStart + n * 4),
      screen,
      width,
      coreRows,
      { threshold, includeAA: true, diffMask: true },
    );
    screenMs = performance.now() - screenStarted;
    if (count === 0) {
      scratch.screenClean = true;
      return { deltaE, score, kind, structural, shift, flagged: 0, candidates: 0, screenMs };
    }
  }
  const r = settings.radiusPx;
  // CIELAB only where it is looked at (screened pixels and, where they need the search, their neighbours within
  // the registration radius), for both images through one colour cache: as fast here as page-sized CIELAB
  // buffers of the two images, which would hold 12 bytes a pixel each.
  const keys = scratch.labKeys, values = scratch.labValues, scan = band.scan, artLow = art.low;
  const contrastOf = art.contrast, lightGround = art.lightGround, wideContrast = art.wideContrast;
  const everyPixel = settings.everyPixel === true;
  const bound = (low / DE00_OVER_DEAB) ** 2;
  const peak = settings.peakDeltaE00;
  const inspect = band.inspect;
  const edgeAllowance = settings.edgeAllowance ?? EDGE_ALLOWANCE;
  const sample = settings.sample;
  const flatAllowance = settings.flatAllowance;
  let flagged = 0;
  let candidates = 0;
  for (let cy = 0; cy < coreRows; cy++) {
    const y = cy + coreY;
    const y0 = Math.max(0, y - r), y1 = Math.min(rows - 1, y + r);
    for (let x = 0; x < width; x++) {
      const i = cy * width + x;
      if (sample && inspect[i] === 1) {
        const p = y * width + x;
        if (contrastOf[p] >= EDGE_MIN_CONTRAST) sample.edgePixels++;
        else sample.flatPixels[toneBin(artLow, p)]++;
      }
      if (screen !== null) {
        if (screen[i * 4 + 3] === 0) continue;
        screen[i * 4 + 3] = 0;
      }
      if (inspect[i] === 0) continue;
      candidates++;
      const pix = y * width + x;
      let v = labSlot(scan, pix, keys, values);
      const sl = values[v], sa = values[v + 1], sb = values[v + 2];
      v = labSlot(artLow, pix, keys, values);
      const al = values[v], aa = values[v + 1], ab = values[v + 2];
      const direct = (sl - al) ** 2 + (sa - aa) ** 2 + (sb - ab) ** 2;
      if (direct < bound && !everyPixel) continue;
      // ΔE00 is at most 1.4 × ΔE*ab, and the best match is no farther than the pixel itself: where even the
      // direct difference cannot clear the pixel's allowance, no search can flag it. A pixel counts when ΔE00
      // less the edge allowance reaches the pixel level, or, near type on a light ground, when ΔE00 less the
      // structural allowance reaches the profile's level.
      const contrast = contrastOf[pix];
      const nearType = lightGround[pix] === 1 && contrast >= STRUCTURAL_MIN_CONTRAST;
      const bleed = wideContrast[pix];
      const flat = contrast < EDGE_MIN_CONTRAST;
      const noise = flat && flatAllowance ? flatAllowance[toneBin(artLow, pix)] : 0;
      // Flat noise is forgiven on ink only: a colour shift is judged over its whole area (findings.ts), where
      // noise averages out, and it may fill most of a tone (a reprinted panel).
      const inkAllowance = edgeAllowance * contrast + BLEED_ALLOWANCE_INK * bleed + noise;
      const colourAllowance = EDGE_ALLOWANCE_COLOUR * contrast + BLEED_ALLOWANCE_COLOUR * bleed;
      const edgeFloor = low + Math.min(inkAllowance, colourAllowance);
      const floor = nearType ? Math.min(edgeFloor, peak + EDGE_ALLOWANCE_STRUCTURAL * contrast) : edgeFloor;
      if (DE00_OVER_DEAB * DE00_OVER_DEAB * direct < floor * floor && !everyPixel) continue;
      const x0 = Math.max(0, x - r), x1 = Math.min(width - 1, x + r);
      // Scan pixel against artwork neighbours (best match m1), and artwork pixel against scan neighbours (m2).
      let best1 = direct, m1l = al, m1a = aa, m1b = ab;
      let best2 = direct, m2l = sl, m2a = sa, m2b = sb;
      for (let yy = y0; yy <= y1 && (best1 >= bound || best2 >= bound); yy++) {
        for (let qi = yy * width + x0, qEnd = yy * width + x1; qi <= qEnd; qi++) {
          v = labSlot(artLow, qi, keys, values);
          const d1 = (sl - values[v]) ** 2 + (sa - values[v + 1]) ** 2 + (sb - values[v + 2]) ** 2;
          if (d1 < best1) { best1 = d1; m1l = values[v]; m1a = values[v + 1]; m1b = values[v + 2]; }
          v = labSlot(scan, qi, keys, values);
          const d2 = (al - values[v]) ** 2 + (aa - values[v + 1]) ** 2 + (ab - values[v + 2]) ** 2;
          if (d2 < best2) { best2 = d2; m2l = values[v]; m2a = values[v + 1]; m2b = values[v + 2]; }
        }
      }
      const worst = Math.sqrt(Math.max(best1 < bound ? 0 : best1, best2 < bound ? 0 : best2));
      if (DE00_OVER_DEAB * worst < floor && !everyPixel) continue;
      const e1 = best1 < bound ? 0 : deltaE00(m1l, m1a, m1b, sl, sa, sb);
      const e2 = best2 < bound ? 0 : deltaE00(al, aa, ab, m2l, m2a, m2b);
      const e = e1 > e2 ? e1 : e2;
      if (e < low && !everyPixel) continue;
      const k = classify(al, aa, ab, sl, sa, sb);
      if (sample && flat) {
        sample.flatDeltaE[toneBin(artLow, pix) * (FLAT_SAMPLE_STEPS + 1) + Math.min(FLAT_SAMPLE_STEPS, Math.floor(e * FLAT_SAMPLE_RESOLUTION))]++;
      } else if (sample && k !== PIXEL_COLOUR_SHIFT) {
        const needed = (e - low - BLEED_ALLOWANCE_INK * bleed) / contrast;
        if (needed > 0) sample.edgeNeeded[Math.min(EDGE_SAMPLE_STEPS, Math.floor(needed * EDGE_SAMPLE_STEPS))]++;
      }
      const s = e - (k === PIXEL_COLOUR_SHIFT ? colourAllowance : inkAllowance);
      // Small print is dark type on a light ground (the ground's lightness dominates around it); in type
      // reversed out of a dark solid the scan's softness fills strokes in, which looks much like a change.
      const structuralInk = k !== PIXEL_COLOUR_SHIFT && nearType && e - EDGE_ALLOWANCE_STRUCTURAL * contrast >= peak;
      if (s < low && !structuralInk && !everyPixel) continue;
      scratch.wrote(i);
      structural[i] = (structuralInk ? k : 0) | (contrast >= STRUCTURAL_MIN_CONTRAST ? PIXEL_ON_LINEWORK : 0);
      shift[i * 3] = clamp127(sl - al);
      shift[i * 3 + 1] = clamp127(sa - aa);
      shift[i * 3 + 2] = clamp127(sb - ab);
      deltaE[i] = e;
      score[i] = s > 0 ? s : 0;
      if (s >= low) {
        flagged++;
        kind[i] = k;
      }
    }
  }
  scratch.screenClean = true;
  return { deltaE, score, kind, structural, shift, flagged, candidates, screenMs };
}

function clamp127(v: number): number {
  return v > 127 ? 127 : v < -127 ? -127 : Math.round(v);
}

/**
 * Extra ink when the scan lies farther from paper white (L* 100, a* = b* = 0) than the artwork by at least half
 * the difference, or darker by as much; missing ink when nearer or lighter by as much; otherwise a sideways
 * move in hue or chroma: a colour shift.
 */
function classify(al: number, aa: number, ab: number, sl: number, sa: number, sb: number): number {
  const fromWhiteArt = Math.sqrt((100 - al) ** 2 + aa * aa + ab * ab);
  const fromWhiteScan = Math.sqrt((100 - sl) ** 2 + sa * sa + sb * sb);
  const ink = fromWhiteScan - fromWhiteArt;
  const diff = Math.sqrt((sl - al) ** 2 + (sa - aa) ** 2 + (sb - ab) ** 2);
  // A change of lightness by half the difference is ink too: a dark mark on a light tint lands on no
  // straight line from paper white, yet it is extra ink, not a shift of the tint's hue.
  const dl = sl - al;
  if (ink > 0.5 * diff || dl < -0.5 * diff) return PIXEL_EXTRA_INK;
  if (ink < -0.5 * diff || dl > 0.5 * diff) return PIXEL_MISSING_INK;
  return PIXEL_COLOUR_SHIFT;
}

// sRGB 8-bit → CIELAB (D65) as in colour.ts's rgbaToLab, one pixel at a time: rows of the matrix pre-divided
// by the white.
const M = SRGB_TO_XYZ;
const M0 = M[0] / D65_WHITE[0], M1 = M[1] / D65_WHITE[0], M2 = M[2] / D65_WHITE[0];
const M6 = M[6] / D65_WHITE[2], M7 = M[7] / D65_WHITE[2], M8 = M[8] / D65_WHITE[2];

function labInto(rgba: Uint8Array, i: number, out: Float32Array, o: number): void {
  const lut = SRGB8_TO_LINEAR;
  const r = lut[rgba[i * 4]], g = lut[rgba[i * 4 + 1]], b = lut[rgba[i * 4 + 2]];
  const fx = labFFast(M0 * r + M1 * g + M2 * b);
  const fy = labFFast(M[3] * r + M[4] * g + M[5] * b);
  const fz = labFFast(M6 * r + M7 * g + M8 * b);
  out[o] = 116 * fy - 16;
  out[o + 1] = 500 * (fx - fy);
  out[o + 2] = 200 * (fy - fz);
}

/**
 * Where the CIELAB of RGBA pixel i sits in `values` (3 a slot), computed into its cache slot when absent.
 * Read it at once: the next lookup may take the slot over.
 */
function labSlot(rgba: Uint8Array, i: number, keys: Int32Array, values: Float32Array): number {
  const key = (rgba[i * 4] << 16) | (rgba[i * 4 + 1] << 8) | rgba[i * 4 + 2];
  const slot = Math.imul(key, 0x9e3779b1) >>> 16;
  if (keys[slot] !== key) {
    labInto(rgba, i, values, slot * 3);
    keys[slot] = key;
  }
  return slot * 3;
}
