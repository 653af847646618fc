// FINDINGS: connected regions of flagged pixels, labelled on runs (one run = a stretch of flagged pixels in a
// row) so that bands of any height join up without a full-size label image; then the second level of the
// two-level flagging (a region stays only if its peak reaches the profile's ΔE00), merging of nearby blobs,
// the minimum area, and the up each region lies in.
import { PIXEL_COLOUR_SHIFT, PIXEL_EXTRA_INK, PIXEL_MISSING_INK, PIXEL_ON_LINEWORK, type BandDifference } from "../compare/compare";
import { pxToMm } from "../raster";
import type { Finding, FindingKind, RectMm, UpsLayout } from "../types";

/** A connected region in artwork pixels; x1, y1 exclusive. */
export interface Region {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
  count: number;
  sumDeltaE: number;
  maxDeltaE: number;
  /** Highest score (ΔE00 less the edge allowance). */
  maxScore: number;
  /** Pixels whose score reaches the second level (the profile's ΔE00). */
  strongCount: number;
  /** ΔE-weighted votes for extra ink, missing ink, colour shift. */
  votes: [number, number, number];
  /** Pixels reaching the second level within the structural allowance: extra ink, missing ink. */
  structural: [number, number];
  /** Sum of the pixels' scan − artwork CIELAB vectors, and of their lengths (coherence, see COLOUR_COHERENCE). */
  shiftSum: [number, number, number];
  shiftLength: number;
  /** Pixels where the artwork has type or linework around them. */
  onLinework: number;
  /** Sums of x, y, x², y², x·y over the region's pixels (its shape: streaks are long and thin). */
  moments: [number, number, number, number, number];
}

/** Labels flagged pixels band after band (rows in page order), 8-connected. */
export class RegionCollector {
  private runX0: number[] = [];
  private runX1: number[] = [];
  private runY: number[] = [];
  private runSum: number[] = [];
  private runMax: number[] = [];
  private runScore: number[] = [];
  private runStrong: number[] = [];
  private runVotes: number[] = [];
  private runStructural: number[] = [];
  private runShift: number[] = [];
  private runLinework: number[] = [];
  private parent: number[] = [];
  private prevStart = 0;
  private prevEnd = 0;
  private lastRow = -2;

  /**
   * `peakLevel`: the second level of the two-level flagging, counted per region. `colourShifts`: collect only
   * colour-shift pixels (true), only the others (false), or all (undefined). Apart, a dark solid's beating
   * screen (a region of colour differences pointing every way, see COLOUR_COHERENCE) cannot swallow the speck
   * of ink inside it.
   */
  constructor(
    private readonly width: number,
    private readonly peakLevel = Infinity,
    private readonly colourShifts?: boolean,
  ) {}

  private takes(deltaE: number, kind: number): boolean {
    if (deltaE === 0) return false;
    return this.colourShifts === undefined || (kind === PIXEL_COLOUR_SHIFT) === this.colourShifts;
  }

  get runCount(): number {
    return this.runY.length;
  }

  /** Adds the core rows of one band; `pageY` is the page row of its first core row, `pageX` its first column. */
  addBand(diff: BandDifference, rows: number, pageY: number, pageX = 0, bandWidth = this.width): void {
    const { deltaE, kind, score, structural, shift } = diff;
    for (let row = 0; row < rows; row++) {
      const y = pageY + row;
      if (y !== this.lastRow + 1) this.prevStart = this.prevEnd = this.runY.length;
      const rowStart = this.runY.length;
      const base = row * bandWidth;
      let x = 0;
      while (x < bandWidth) {
        if (!this.takes(deltaE[base + x], kind[base + x])) { x++; continue; }
        const start = x;
        let sum = 0, max = 0, top = 0, strong = 0, v1 = 0, v2 = 0, v3 = 0, s1 = 0, s2 = 0, dl = 0, da = 0, db = 0, len = 0, lw = 0;
        while (x < bandWidth && this.takes(deltaE[base + x], kind[base + x])) {
          const e = deltaE[base + x];
          const sc = score[base + x];
          if (sc > top) top = sc;
          if (sc >= this.peakLevel) strong++;
          sum += e;
          if (e > max) max = e;
          const st = structural[base + x];
          if ((st & 3) === PIXEL_EXTRA_INK) s1++;
          else if ((st & 3) === PIXEL_MISSING_INK) s2++;
          if (st & PIXEL_ON_LINEWORK) lw++;
          const o = (base + x) * 3, sx = shift[o], sy = shift[o + 1], sz = shift[o + 2];
          dl += sx; da += sy; db += sz; len += Math.sqrt(sx * sx + sy * sy + sz * sz);
          const k = kind[base + x];
          if (k === PIXEL_EXTRA_INK) v1 += e;
          else if (k === PIXEL_MISSING_INK) v2 += e;
          else if (k === PIXEL_COLOUR_SHIFT) v3 += e;
          x++;
        }
        const id = this.runY.length;
        this.runX0.push(pageX + start); this.runX1.push(pageX + x); this.runY.push(y);
        this.runSum.push(sum); this.runMax.push(max); this.runScore.push(top); this.runStrong.push(strong); this.runVotes.push(v1, v2, v3); this.runStructural.push(s1, s2); this.runShift.push(dl, da, db, len); this.runLinework.push(lw);
        this.parent.push(id);
      }
      this.joinRows(this.prevStart, this.prevEnd, rowStart, this.runY.length);
      this.prevStart = rowStart;
      this.prevEnd = this.runY.length;
      this.lastRow = y;
    }
  }

  /** Runs of consecutive rows touch when their column ranges overlap or meet diagonally. */
  private joinRows(aStart: number, aEnd: number, bStart: number, bEnd: number): void {
    let a = aStart;
    for (let b = bStart; b < bEnd; b++) {
      while (a < aEnd && this.runX1[a] < this.runX0[b]) a++;
      for (let k = a; k < aEnd && this.runX0[k] <= this.runX1[b]; k++) this.union(k, b);
    }
  }

  private find(i: number): number {
    while (this.parent[i] !== i) {
      this.parent[i] = this.parent[this.parent[i]];
      i = this.parent[i];
    }
    return i;
  }

  private union(a: number, b: number): void {
    const ra = this.find(a), rb = this.find(b);
    if (ra !== rb) this.parent[Math.max(ra, rb)] = Math.min(ra, rb);
  }

  regions(): Region[] {
    const byRoot = new Map<number, Region>();
    for (let i = 0; i < this.runY.length; i++) {
      const root = this.find(i);
      let r = byRoot.get(root);
      if (!r) {
        r = { x0: Infinity, y0: Infinity, x1: -Infinity, y1: -Infinity, count: 0, sumDeltaE: 0, maxDeltaE: 0, maxScore: 0, strongCount: 0, votes: [0, 0, 0], structural: [0, 0], shiftSum: [0, 0, 0], shiftLength: 0, onLinework: 0, moments: [0, 0, 0, 0, 0] };
        byRoot.set(root, r);
      }
      r.x0 = Math.min(r.x0, this.runX0[i]); r.x1 = Math.max(r.x1, this.runX1[i]);
      r.y0 = Math.min(r.y0, this.runY[i]); r.y1 = Math.max(r.y1, this.runY[i] + 1);
      r.count += this.runX1[i] - this.runX0[i];
      r.sumDeltaE += this.runSum[i];
      r.maxDeltaE = Math.max(r.maxDeltaE, this.runMax[i]);
      r.maxScore = Math.max(r.maxScore, this.runScore[i]);
      r.strongCount += this.runStrong[i];
      for (let k = 0; k < 3; k++) r.votes[k] += this.runVotes[i * 3 + k];
      r.structural[0] += this.runStructural[i * 2];
      r.structural[1] += this.runStructural[i * 2 + 1];
      for (let k = 0; k < 3; k++) r.shiftSum[k] += this.runShift[i * 4 + k];
      r.shiftLength += this.runShift[i * 4 + 3];
      r.onLinework += this.runLinework[i];
      // A run of n pixels x0 … x1 − 1 on row y, in closed form.
      const a = this.runX0[i], n = this.runX1[i] - a, y = this.runY[i];
      const sx = n * a + (n * (n - 1)) / 2, sxx = n * a * a + a * n * (n - 1) + ((n - 1) * n * (2 * n - 1)) / 6;
      const m = r.moments;
      m[0] += sx; m[1] += n * y; m[2] += sxx; m[3] += n * y * y; m[4] += sx * y;
    }
    return [...byRoot.values()];
  }
}

/**
 * Smallest colour shift reported, mm² (a 2 × 2 mm patch). Colour is judged over areas (a spectrophotometer's
 * aperture is a few mm across — from memory, 3–4 mm is usual); a speck of hue alone is scan noise, JPEG chroma
 * blocking, board mottle or a scrap of a picture's colour (at 1 mm², half the colour regions on the second
 * simulator's clean training sheets were under 4 mm²), while a speck of ink (extra or missing) keeps the
 * profile's smaller minimum.
 */
const MIN_COLOUR_SHIFT_MM2 = 4;
/**
 * A spot of colour under that area is still reported when it peaks at this many times the profile's ΔE00: a
 * coloured pen dot or hickey, not a tint (three such spots of 1–1.3 mm were lost on the second simulator's
 * training sheets when the area alone decided).
 */
const SPOT_PEAK_SHARE = 5;
/**
 * A colour shift is a change of the ink's colour over an area, so its pixels' differences point one way: the
 * length of their mean vector is most of their mean length (0.9 and more on a reprinted or contaminated patch).
 * A dark solid's screen beating against the scanner's grid, or mottle, makes a region of differences pointing
 * every way, whose mean is small: a spectrophotometer's aperture averages it away, and so does this rule.
 */
const COLOUR_COHERENCE = 0.5;
/**
 * A speck or void of ink peaks well above the profile's level; the sheet's own noise (mottle, a tint's moiré)
 * that gets past the flat allowance peaks just over it (false regions on the second simulator's training
 * sheets: ΔE00 max 4.4–5.5 under a profile of 4).
 */
const INK_PEAK_SHARE = 1.25;
/**
 * A colour shift is judged by its mean, as a colour tolerance is (ISO 12647-2 states its tolerances for the mean
 * of a measured patch; from memory): a region whose mean ΔE00 stays under the profile's figure is within
 * tolerance, whatever its peak. 0.9 of the figure, not all of it, because a scan's mean of a reprinted patch
 * reads a little under the patch's own ΔE00 (6.66 for a patch of 6.8 on the second simulator's training
 * sheets); the strays this removes there were board and ink mottle of mean 2.7–3.6 (39 of 460 regions).
 */
const COLOUR_MEAN_SHARE = 0.9;
/** Structural pixels (both kinds together) a changed glyph needs, in units of minStrongPx. */
const STRUCTURAL_SHARE = 2;

export interface FindingRules {
  dpi: number;
  /** The profile's ΔE00: an ink region's peak (INK_PEAK_SHARE) and a colour region's mean (COLOUR_MEAN_SHARE) are measured against it. */
  peakDeltaE00?: number;
  /** Second level: this many of a region's pixels must reach the profile's ΔE00 (a single pixel is noise). */
  minStrongPx: number;
  /** Smallest area kept, mm². */
  minAreaMm2: number;
  /** Regions whose boxes lie within this distance are one finding, mm. */
  mergeMm: number;
  ups?: UpsLayout;
  pageMm: { widthMm: number; heightMm: number };
}

/** Regions → findings (without crops), largest first. */
export function regionsToFindings(regions: Region[], rules: FindingRules): { findings: Finding[]; kept: Region[] } {
  const gapPx = (rules.mergeMm * rules.dpi) / 25.4;
  // Incoherent colour regions go before any merging, which would hide them in a larger, mixed region.
  regions = regions.filter((r) => kindOf(r.votes) !== "colour_shift" || coherence(r) >= COLOUR_COHERENCE);
  const strong = regions.filter((r) => r.strongCount >= rules.minStrongPx);
  // A changed glyph: the added and the removed strokes are separate small blobs, each often below the minimum
  // area. Taken together they count when they reach the second level like any region and hold enough pixels
  // within the structural allowance, of both extra and missing ink (a scan's softness only fills in or thins)
  // unless the second level alone is reached over as many pixels.
  const structuralPx = STRUCTURAL_SHARE * rules.minStrongPx;
  const glyphs = mergeNearby(regions.filter((r) => r.structural[0] + r.structural[1] > 0), gapPx)
    .filter((r) => r.strongCount >= rules.minStrongPx && r.structural[0] + r.structural[1] >= structuralPx && ((r.structural[0] >= 1 && r.structural[1] >= 1) || r.strongCount >= structuralPx));
  const merged = mergeByClass([...strong, ...glyphs], gapPx);
  const pxArea = (25.4 / rules.dpi) ** 2;
  const peak = rules.peakDeltaE00;
  const keeps = (r: Region): boolean => {
    const areaMm2 = r.count * pxArea;
    if (kindOf(r.votes) !== "colour_shift") return areaMm2 >= rules.minAreaMm2 && (peak === undefined || r.maxDeltaE >= INK_PEAK_SHARE * peak);
    const spot = peak !== undefined && r.maxDeltaE >= SPOT_PEAK_SHARE * peak;
    return areaMm2 >= (spot ? rules.minAreaMm2 : Math.max(rules.minAreaMm2, MIN_COLOUR_SHIFT_MM2)) && (peak === undefined || r.sumDeltaE / r.count >= COLOUR_MEAN_SHARE * peak);
  };
  const kept = merged.filter(keeps).sort((a, b) => b.count - a.count);
  const findings = kept.map((r): Finding => {
    const box: RectMm = {
      x: pxToMm(r.x0, rules.dpi),
      y: pxToMm(r.y0, rules.dpi),
      w: pxToMm(r.x1 - r.x0, rules.dpi),
      h: pxToMm(r.y1 - r.y0, rules.dpi),
    };
    return {
      xMm: round3(box.x),
      yMm: round3(box.y),
      wMm: round3(box.w),
      hMm: round3(box.h),
      areaMm2: round3(r.count * pxArea),
      kind: kindOfRegion(r, rules.dpi),
      deltaE00Mean: round2(r.sumDeltaE / r.count),
      deltaE00Max: round2(r.maxDeltaE),
      up: upOf(box, rules.ups, rules.pageMm),
    };
  });
  return { findings, kept };
}

/**
 * A streak or scratch is long and thin: the region's spread along its main axis against across it (second
 * moments; a uniform line of length L has σ = L / √12). Streaks and scratches of 0.15–0.4 mm come out of the
 * low-pass under about 1 mm wide; a changed word is at least its x-height (≈ 1.1 mm at 6 pt) tall.
 */
const STREAK_MIN_LENGTH_MM = 4;
const STREAK_MAX_WIDTH_MM = 1.2;
const STREAK_MIN_ELONGATION = 5;
/**
 * A changed or missing piece of text or linework: most of the region lies on the artwork's type or linework
 * and some of it is ink taken away (a changed glyph removes strokes as well as adding them; a missing word
 * only removes). A spot of pen ink on type adds only.
 */
const TEXT_MIN_LINEWORK_SHARE = 0.6;
const TEXT_MIN_MISSING_SHARE = 0.25;

/**
 * A colour patch: a region of at least MIN_COLOUR_SHIFT_MM2 off the artwork's type whose mean ΔE00 stays under
 * this, whichever way its pixels lean. A reprinted or contaminated patch is a few ΔE00 lighter or darker (ΔE00
 * 4–12 on the second simulator), while a spot, splash or void of ink differs by the whole ink (mean ΔE00 20
 * and more; felt-tip dots and voids under 4 mm² besides).
 */
const COLOUR_PATCH_MAX_MEAN = 12;

export function kindOfRegion(r: Region, dpi: number): FindingKind {
  const base = kindOf(r.votes);
  const areaMm2 = r.count * (25.4 / dpi) ** 2;
  if (base === "colour_shift") {
    // Under the colour minimum a region is kept only as a spot of strong colour (SPOT_PEAK_SHARE): a dot of
    // pen ink or a hickey's core when darker than the artwork, a void when lighter.
    if (areaMm2 >= MIN_COLOUR_SHIFT_MM2) return base;
    return r.shiftSum[0] < 0 ? "extra_ink" : "missing_ink";
  }
  const { length, width } = shapeMm(r, dpi);
  if (length >= STREAK_MIN_LENGTH_MM && width <= STREAK_MAX_WIDTH_MM && length >= STREAK_MIN_ELONGATION * width) return "streak";
  const ink = r.votes[0] + r.votes[1];
  const onType = r.onLinework >= TEXT_MIN_LINEWORK_SHARE * r.count;
  if (onType && r.votes[1] >= TEXT_MIN_MISSING_SHARE * ink) return "changed_text";
  if (!onType && areaMm2 >= MIN_COLOUR_SHIFT_MM2 && r.sumDeltaE / r.count <= COLOUR_PATCH_MAX_MEAN) return "colour_shift";
  return base;
}

/** Length and width (mm) of the region as a uniform bar with the same second moments. */
export function shapeMm(r: Region, dpi: number): { length: number; width: number } {
  const n = r.count, [sx, sy, sxx, syy, sxy] = r.moments;
  const mx = sx / n, my = sy / n;
  // Each pixel is a unit square: its own variance 1/12 per axis.
  const vxx = sxx / n - mx * mx + 1 / 12, vyy = syy / n - my * my + 1 / 12, vxy = sxy / n - mx * my;
  const tr = vxx + vyy, det = vxx * vyy - vxy * vxy;
  const d = Math.sqrt(Math.max(0, (tr * tr) / 4 - det));
  const l1 = tr / 2 + d, l2 = Math.max(0, tr / 2 - d);
  const mm = 25.4 / dpi;
  return { length: Math.sqrt(12 * l1) * mm, width: Math.sqrt(12 * l2) * mm };
}

/** Length of the region's mean difference vector over its pixels' mean length, 0–1. */
function coherence(r: Region): number {
  const [l, a, b] = r.shiftSum;
  return r.shiftLength > 0 ? Math.sqrt(l * l + a * a + b * b) / r.shiftLength : 1;
}

function kindOf(votes: [number, number, number]): FindingKind {
  const [extra, missing, shift] = votes;
  if (shift > extra && shift > missing) return "colour_shift";
  return extra >= missing ? "extra_ink" : "missing_ink";
}

/**
 * A colour region and an ink region join only when neither is over this many times the other's area: a speck
 * of ink beside a tint's colour shift (or inside the noise of a picture) is its own finding with its own tight
 * box, not a corner of the larger one (tight recall on 70 training sheets of the second simulator 86.5 % with
 * every class merged together, 92.7 % with this).
 */
const CROSS_CLASS_AREA_RATIO = 10;

/**
 * Colour regions and ink regions linked each among their own first; then a colour and an ink region that come
 * near join their groups when the groups are alike in size.
 */
function mergeByClass(regions: Region[], gapPx: number): Region[] {
  const colour = regions.map((r) => kindOf(r.votes) === "colour_shift");
  const groups = new UnionFind(regions.length);
  forNearPairs(regions, gapPx, (i, j) => { if (colour[i] === colour[j]) groups.union(i, j); });
  const size = new Map<number, number>();
  regions.forEach((r, i) => size.set(groups.find(i), (size.get(groups.find(i)) ?? 0) + r.count));
  const alike = (i: number, j: number) => {
    const a = size.get(groups.find(i))!, b = size.get(groups.find(j))!;
    return Math.max(a, b) <= CROSS_CLASS_AREA_RATIO * Math.min(a, b);
  };
  const crossing: [number, number][] = [];
  forNearPairs(regions, gapPx, (i, j) => { if (colour[i] !== colour[j] && alike(i, j)) crossing.push([i, j]); });
  for (const [i, j] of crossing) groups.union(i, j);
  return combine(regions, groups);
}

/** Joins regions whose own boxes come within `gapPx` of each other, directly or through other regions. */
function mergeNearby(regions: Region[], gapPx: number): Region[] {
  // Single linkage on the regions' own boxes: two regions join when their boxes come within the gap. Testing
  // against a merged region's growing box instead made the box itself the bridge: its empty corners reached
  // regions near no member, and noise chained into a box over a whole label.
  const groups = new UnionFind(regions.length);
  forNearPairs(regions, gapPx, (i, j) => groups.union(i, j));
  return combine(regions, groups);
}

/** Calls `visit` for every pair of regions whose boxes come within `gapPx` of each other. */
function forNearPairs(regions: Region[], gapPx: number, visit: (i: number, j: number) => void): void {
  const order = regions.map((_, i) => i).sort((a, b) => regions[a].x0 - regions[b].x0);
  for (let oi = 0; oi < order.length; oi++) {
    const a = regions[order[oi]];
    for (let oj = oi + 1; oj < order.length; oj++) {
      const b = regions[order[oj]];
      if (b.x0 - gapPx > a.x1) break; // sorted by x0: no later region can come nearer in x
      if (a.x0 - gapPx > b.x1 || a.y0 - gapPx > b.y1 || b.y0 - gapPx > a.y1) continue;
      visit(order[oi], order[oj]);
    }
  }
}

class UnionFind {
  private readonly parent: Int32Array;
  constructor(n: number) {
    this.parent = Int32Array.from({ length: n }, (_, i) => i);
  }
  find(i: number): number {
    const p = this.parent;
    while (p[i] !== i) i = p[i] = p[p[i]];
    return i;
  }
  union(a: number, b: number): void {
    this.parent[this.find(a)] = this.find(b);
  }
}

/** One region per group: boxes joined, counts and sums added. */
function combine(regions: Region[], groups: UnionFind): Region[] {
  const byRoot = new Map<number, Region>();
  for (let i = 0; i < regions.length; i++) {
    const b = regions[i], root = groups.find(i);
    const a = byRoot.get(root);
    if (!a) {
      byRoot.set(root, { ...b, votes: [...b.votes] as [number, number, number], structural: [...b.structural] as [number, number], shiftSum: [...b.shiftSum] as [number, number, number], moments: [...b.moments] as Region["moments"] });
      continue;
    }
    a.x0 = Math.min(a.x0, b.x0); a.y0 = Math.min(a.y0, b.y0);
    a.x1 = Math.max(a.x1, b.x1); a.y1 = Math.max(a.y1, b.y1);
    a.count += b.count; a.sumDeltaE += b.sumDeltaE; a.maxDeltaE = Math.max(a.maxDeltaE, b.maxDeltaE); a.maxScore = Math.max(a.maxScore, b.maxScore); a.strongCount += b.strongCount;
    for (let k = 0; k < 3; k++) a.votes[k] += b.votes[k];
    a.structural[0] += b.structural[0];
    a.structural[1] += b.structural[1];
    for (let k = 0; k < 3; k++) a.shiftSum[k] += b.shiftSum[k];
    a.shiftLength += b.shiftLength;
    a.onLinework += b.onLinework;
    for (let k = 0; k < 5; k++) a.moments[k] += b.moments[k];
  }
  return [...byRoot.values()];
}

/** 1-based row-major up containing the box centre; null outside the ups' area or without a layout. */
export function upOf(box: RectMm, ups: UpsLayout | undefined, page: { widthMm: number; heightMm: number }): number | null {
  if (!ups || ups.rows < 1 || ups.columns < 1) return null;
  const area = ups.areaMm ?? { x: 0, y: 0, w: page.widthMm, h: page.heightMm };
  const cx = box.x + box.w / 2, cy = box.y + box.h / 2;
  if (cx < area.x || cy < area.y || cx >= area.x + area.w || cy >= area.y + area.h) return null;
  const col = Math.min(ups.columns - 1, Math.floor(((cx - area.x) / area.w) * ups.columns));
  const row = Math.min(ups.rows - 1, Math.floor(((cy - area.y) / area.h) * ups.rows));
  return row * ups.columns + col + 1;
}

function round2(v: number): number {
  return Math.round(v * 100) / 100;
}

function round3(v: number): number {
  return Math.round(v * 1000) / 1000;
}
