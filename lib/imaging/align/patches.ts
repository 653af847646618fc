// FINE registration on patches at the comparison resolution (the artwork raster, reduced to ≤ ~150 dpi).
//
// Why patches: after ECC on small levels the map is right to a few tenths of a millimetre; the last tenth needs
// full detail, but only in a few places. Windows of 64 px are spread over the covered area (in each grid cell
// the position with the strongest two-way structure — the smaller structure-tensor eigenvalue of J. Shi &
// C. Tomasi, "Good features to track", CVPR 1994, cited from memory — so that a window on a single rule
// cannot slide along it), each located in the scan resampled through the
// current map by matchTemplate within a small search radius and a parabolic sub-pixel peak, and an affine map
// is fitted through all of them, dropping outliers (a defect or the sheet number under a window). Two passes:
// the second starts from the first fit, so the offsets are near zero, where the parabola's bias vanishes.
// The search radius is a millimetre, far below the pitch of repeated ups, so no window can lock onto the wrong up.
// The same measurement on a denser grid, relative to the final affine, gives the optional local field
// (field.ts).
import { apply, compose, fitAffine, type Affine } from "./affine";
import { peak } from "./coarse";
import { withMats, type OpenCv } from "./opencv";
import { levelPixel, levelToFull, levelWindow } from "./pyramid";
import type { RgbaImage } from "../types";

export type Image = RgbaImage & { dpi: number };

/**
 * The artwork at the fine level, read patch by patch from the RGBA (see levelWindow), never as a whole level
 * (that would be 100 MB of floats for a B1 sheet at 300 dpi). Patches and structure values are remembered per
 * artwork: every sheet of a job uses the same artwork, and the sites come out the same sheet after sheet
 * (the covered rectangle is snapped to a lattice), so from the second sheet on they cost nothing.
 */
export interface FineArtwork {
  width: number;
  height: number;
  /** The PATCH × PATCH window with its top-left at level pixel (x0, y0). Do not modify. */
  patch(x0: number, y0: number): Float32Array;
  /** Smaller structure-tensor eigenvalue over the patch centred on (x, y), sampled every `stride` pixels. */
  structure(x: number, y: number, stride: number): number;
}

export const PATCH = 64;
const FINE_DPI = 150;
const GRID = 6;
const MIN_SCORE = 0.6;
/** Fewest structured sites for a patch fit. */
const MIN_SITES = 6;
/** Largest search radius, fine-level px (the first pass: 1.2 mm at 150 dpi). */
export const MAX_RADIUS = 8;

export interface Measure {
  /** Patch centre, full artwork px. */
  at: [number, number];
  /** Offset o (full artwork px): the scan shows artwork point p at map(p + o). */
  off: [number, number];
  /** Index of the site measured. */
  site: number;
  score: number;
}

export function refineOnPatches(cv: OpenCv, artwork: Image, scan: Image, map: Affine) {
  const kF = Math.max(1, Math.round(artwork.dpi / FINE_DPI));
  const art = fineArtwork(artwork, kF);
  const toFull = levelToFull(kF);
  const cover = coveredLevelRect(map, toFull, art, scan);
  let residualPx = NaN;
  // Share of the structured sites that found their patch where the fit says (score-weighted): near 1 for a
  // scan of this artwork, low for a similar-looking design, whose patches find nothing or disagree.
  let agreement: number | null = null;
  const radius = (mm: number) => Math.min(MAX_RADIUS, Math.max(2, Math.ceil((mm * artwork.dpi) / kF / 25.4)));
  const chosen = cover ? chooseSites(art, cover, GRID, GRID) : null;
  if (chosen && chosen.at.length >= MIN_SITES) {
    const sites = chosen.at;
    // Every site in both passes: on the B2 sheet a first pass on half of them (a checkerboard of the cells)
    // saved 3 ms but left the final map 0.0075 mm out instead of 0.0051 mm (the second pass's start matters).
    const first = robustFit(measure(cv, art, scan, map, toFull, sites, radius(1.2)), map);
    agreement = 0;
    if (first) {
      map = first.map;
      residualPx = first.rms;
      const fit = robustFit(measure(cv, art, scan, map, toFull, sites, radius(0.3)), map);
      if (fit) {
        agreement = fit.inliers.reduce((a, m) => a + m.score, 0) / sites.length;
        map = fit.map;
        residualPx = fit.rms;
      }
    }
  }
  // The fine level and covered area go back with the result for the optional local field (field.ts).
  return { map, residualPx: Number.isFinite(residualPx) ? residualPx : 0, agreement, fine: cover ? { art, toFull, cover, dpi: artwork.dpi / kF } : null };
}

/** Covered part of the fine level, inset so whole patches plus their search windows stay on page and scan. */
function coveredLevelRect(map: Affine, toFull: Affine, art: FineArtwork, scan: RgbaImage): Rect | null {
  const lm = compose(map, toFull);
  const inset = PATCH / 2 + MAX_RADIUS + 2;
  const scanInset = inset * Math.sqrt(Math.abs(lm[0] * lm[4] - lm[1] * lm[3]));
  // Bounding box of the points of a lattice over the level that land well inside the scan.
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  const step = Math.max(2, Math.floor(Math.min(art.width, art.height) / 100));
  for (let y = inset; y < art.height - inset; y += step) {
    for (let x = inset; x < art.width - inset; x += step) {
      const [sx, sy] = apply(lm, x, y);
      if (sx >= scanInset && sy >= scanInset && sx < scan.width - scanInset && sy < scan.height - scanInset) {
        x0 = Math.min(x0, x);
        y0 = Math.min(y0, y);
        x1 = Math.max(x1, x);
        y1 = Math.max(y1, y);
      }
    }
  }
  if (!(x1 - x0 >= PATCH && y1 - y0 >= PATCH)) return null;
  return { x0, y0, x1, y1 };
}

export type Rect = { x0: number; y0: number; x1: number; y1: number };

const fine = new WeakMap<object, Map<number, FineArtwork>>();
/** Patches remembered per artwork (16 kB each; enough for the local field's sites on a B1 sheet). */
const MAX_PATCHES = 2048;

function fineArtwork(artwork: Image, kF: number): FineArtwork {
  let byK = fine.get(artwork.data);
  if (!byK) fine.set(artwork.data, (byK = new Map()));
  const hit = byK.get(kF);
  if (hit) return hit;
  const patches = new Map<number, Float32Array>(), structures = new Map<number, number>();
  const width = Math.floor(artwork.width / kF), height = Math.floor(artwork.height / kF);
  // Keys: level pixel positions packed in one number (levels stay far below 2^20 pixels a side).
  const art: FineArtwork = {
    width,
    height,
    patch(x0, y0) {
      const key = (y0 + 1024) * 2 ** 21 + (x0 + 1024);
      let p = patches.get(key);
      if (!p) {
        if (patches.size >= MAX_PATCHES) patches.clear();
        patches.set(key, (p = levelWindow(artwork, kF, x0, y0, PATCH, PATCH, new Float32Array(PATCH * PATCH))));
      }
      return p;
    },
    structure(x, y, stride) {
      const key = ((y + 1024) * 2 ** 21 + (x + 1024)) * 16 + stride;
      let v = structures.get(key);
      if (v === undefined) {
        if (structures.size >= 16 * MAX_PATCHES) structures.clear();
        structures.set(key, (v = structure((u, w) => levelPixel(artwork, kF, u, w), width, height, x, y, stride)));
      }
      return v;
    },
  };
  byK.set(kF, art);
  return art;
}

/** Patch centres (fine level px) and their grid cells: per cell the most structured of 3 × 3 positions. */
export function chooseSites(art: FineArtwork, r: Rect, cols: number, rows: number, stride = 4): { at: [number, number][]; cell: number[] } {
  const at: [number, number][] = [], cell: number[] = [];
  const cw = (r.x1 - r.x0) / cols, ch = (r.y1 - r.y0) / rows;
  for (let j = 0; j < rows; j++) {
    for (let i = 0; i < cols; i++) {
      const cx = r.x0 + (i + 0.5) * cw, cy = r.y0 + (j + 0.5) * ch;
      let best: [number, number] = [Math.round(cx), Math.round(cy)], bestS = -1;
      for (const fy of [-0.3, 0, 0.3]) {
        for (const fx of [-0.3, 0, 0.3]) {
          const x = Math.round(cx + fx * cw), y = Math.round(cy + fy * ch);
          const s = art.structure(x, y, stride);
          if (s > bestS) [bestS, best] = [s, [x, y]];
        }
      }
      if (bestS > 1) {
        at.push(best);
        cell.push(j * cols + i);
      }
    }
  }
  return { at, cell };
}

/** Smaller eigenvalue of the structure tensor over the patch around (x, y), sampled every `stride` pixels. */
function structure(at: (x: number, y: number) => number, width: number, height: number, x: number, y: number, stride: number): number {
  const h = PATCH / 2;
  if (x - h < 1 || y - h < 1 || x + h >= width - 1 || y + h >= height - 1) return -1;
  const n = PATCH / stride;
  let sxx = 0, syy = 0, sxy = 0;
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const u = x - h + i * stride, v = y - h + j * stride;
      const gx = at(u + 1, v) - at(u - 1, v), gy = at(u, v + 1) - at(u, v - 1);
      sxx += gx * gx;
      syy += gy * gy;
      sxy += gx * gy;
    }
  }
  sxx /= n * n;
  syy /= n * n;
  sxy /= n * n;
  return (sxx + syy) / 2 - Math.sqrt(((sxx - syy) / 2) ** 2 + sxy * sxy);
}

/**
 * Locate each site's patch in the scan seen through `map`, within ±radius of its prior offset (fine level px).
 * Offsets returned in full artwork px, prior included.
 */
export function measure(
  cv: OpenCv,
  art: FineArtwork,
  scan: Image,
  map: Affine,
  toFull: Affine,
  sites: [number, number][],
  radius: number,
  prior?: [number, number][],
): Measure[] {
  const lm = compose(map, toFull);
  // Scan pixels per fine-level pixel: average that many sub-samples per pixel, as a coarser sensor would.
  const n = Math.max(1, Math.round(Math.sqrt(Math.abs(lm[0] * lm[4] - lm[1] * lm[3]))));
  const out: Measure[] = [];
  const h = PATCH / 2, win = PATCH + 2 * radius;
  const grey = new Scratch();
  withMats((keep) => {
    const templ = keep(new cv.Mat(PATCH, PATCH, cv.CV_32F));
    const image = keep(new cv.Mat(win, win, cv.CV_32F));
    const res = keep(new cv.Mat());
    const t = templ.data32F as Float32Array;
    sites.forEach(([x, y], s) => {
      const [px, py] = prior ? prior[s] : [0, 0];
      t.set(art.patch(x - h, y - h));
      sampleScan(scan, lm, x - h - radius + px, y - h - radius + py, win, n, image.data32F as Float32Array, grey);
      cv.matchTemplate(image, templ, res, cv.TM_CCOEFF_NORMED);
      const r = res.data32F as Float32Array, rw = res.cols as number;
      let bi = 0;
      for (let i = 1; i < r.length; i++) if (r[i] > r[bi]) bi = i;
      const bx = bi % rw, by = (bi - bx) / rw;
      if (!(r[bi] >= MIN_SCORE) || bx === 0 || by === 0 || bx === rw - 1 || by === rw - 1) return;
      const ox = px + bx - radius + peak(r[bi - 1], r[bi], r[bi + 1]);
      const oy = py + by - radius + peak(r[bi - rw], r[bi], r[bi + rw]);
      const [fx, fy] = apply(toFull, x, y);
      out.push({ at: [fx, fy], site: s, off: [ox * toFull[0], oy * toFull[4]], score: r[bi] });
    });
  });
  return out;
}

/**
 * Grey of the scan seen through `lm` (fine level px → scan px) over a win × win window at (x0, y0): n × n
 * bilinear sub-samples per pixel. The luma of the scan pixels under the window is worked out once into `grey`
 * first (each is read by about four sub-samples otherwise).
 */
function sampleScan(scan: RgbaImage, lm: Affine, x0: number, y0: number, win: number, n: number, out: Float32Array, grey: Scratch) {
  const d = scan.data, sw = scan.width, sh = scan.height;
  const clampX = (v: number) => Math.min(Math.max(v, 0), sw - 1.001), clampY = (v: number) => Math.min(Math.max(v, 0), sh - 1.001);
  // Scan pixels the window's sub-samples can reach: the bounding box of its corners, clamped as the samples are.
  let bx0 = Infinity, by0 = Infinity, bx1 = -Infinity, by1 = -Infinity;
  for (const [u, v] of [[-0.5, -0.5], [win - 0.5, -0.5], [-0.5, win - 0.5], [win - 0.5, win - 0.5]]) {
    const xs = clampX(lm[0] * (x0 + u) + lm[1] * (y0 + v) + lm[2]), ys = clampY(lm[3] * (x0 + u) + lm[4] * (y0 + v) + lm[5]);
    bx0 = Math.min(bx0, xs);
    by0 = Math.min(by0, ys);
    bx1 = Math.max(bx1, xs);
    by1 = Math.max(by1, ys);
  }
  const gx0 = Math.floor(bx0), gy0 = Math.floor(by0), gw = Math.floor(bx1) - gx0 + 2, gh = Math.floor(by1) - gy0 + 2;
  const g = grey.get(gw * gh);
  for (let y = 0; y < gh; y++) {
    let p = ((gy0 + y) * sw + gx0) * 4;
    for (let x = 0; x < gw; x++, p += 4) g[y * gw + x] = 0.299 * d[p] + 0.587 * d[p + 1] + 0.114 * d[p + 2];
  }
  const inv = 1 / (n * n), a = lm[0], b = lm[1], c = lm[2] - gx0, e = lm[3], f = lm[4], o = lm[5] - gy0;
  const xMax = sw - 1.001 - gx0, yMax = sh - 1.001 - gy0;
  // Away from the scan's edges (nearly always) no sample needs clamping: step along each row instead.
  const inside = bx0 > 0 && by0 > 0 && bx1 < sw - 1.001 && by1 < sh - 1.001;
  if (inside) {
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        const du = (i + 0.5) / n - 0.5, dv = (j + 0.5) / n - 0.5, first = i === 0 && j === 0;
        for (let v = 0; v < win; v++) {
          let xs = a * (x0 + du) + b * (y0 + v + dv) + c, ys = e * (x0 + du) + f * (y0 + v + dv) + o;
          for (let u = 0, k = v * win; u < win; u++, k++, xs += a, ys += e) {
            const xi = xs | 0, yi = ys | 0, fx = xs - xi, fy = ys - yi;
            const p = yi * gw + xi, q = p + gw;
            const top = g[p] + fx * (g[p + 1] - g[p]), bottom = g[q] + fx * (g[q + 1] - g[q]);
            out[k] = first ? top + fy * (bottom - top) : out[k] + top + fy * (bottom - top);
          }
        }
      }
    }
    if (n > 1) for (let k = 0; k < win * win; k++) out[k] *= inv;
    return;
  }
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const du = (i + 0.5) / n - 0.5, dv = (j + 0.5) / n - 0.5, first = i === 0 && j === 0;
      for (let v = 0; v < win; v++) {
        const ax0 = x0 + du, ay = y0 + v + dv;
        let xs = a * ax0 + b * ay + c, ys = e * ax0 + f * ay + o;
        for (let u = 0, k = v * win; u < win; u++, k++, xs += a, ys += e) {
          let x = xs, y = ys;
          if (!inside) {
            x = x < -gx0 ? -gx0 : x > xMax ? xMax : x;
            y = y < -gy0 ? -gy0 : y > yMax ? yMax : y;
          }
          const xi = Math.floor(x), yi = Math.floor(y), fx = x - xi, fy = y - yi;
          const p = yi * gw + xi, q = p + gw;
          const top = g[p] + fx * (g[p + 1] - g[p]), bottom = g[q] + fx * (g[q + 1] - g[q]);
          const value = top + fy * (bottom - top);
          out[k] = first ? value : out[k] + value;
        }
      }
    }
  }
  if (n > 1) for (let k = 0; k < win * win; k++) out[k] *= inv;
}

/** A reusable Float32Array, grown on demand. */
class Scratch {
  private a = new Float32Array(0);
  get(n: number): Float32Array {
    if (this.a.length < n) this.a = new Float32Array(n);
    return this.a;
  }
}

/** Affine through the measured pairs with outliers dropped; null when too few remain. */
function robustFit(found: Measure[], map: Affine): { map: Affine; rms: number; inliers: Measure[] } | null {
  let use = found;
  let last: { map: Affine; rms: number; inliers: Measure[] } | null = null;
  for (let round = 0; round < MAX_ROUNDS && use.length >= MIN_SITES; round++) {
    const fit = fitAffine(
      use.map((m) => m.at),
      use.map((m) => apply(map, m.at[0] + m.off[0], m.at[1] + m.off[1])),
    );
    const res = residuals(use, map, fit);
    const sorted = [...res].sort((a, b) => a - b);
    const limit = Math.max(3 * sorted[Math.floor(sorted.length / 2)], 0.3);
    const keep = use.filter((_, i) => res[i] <= limit);
    last = { map: fit, rms: Math.sqrt(res.reduce((s, r) => s + r * r, 0) / res.length), inliers: use };
    if (keep.length === use.length) return last;
    use = keep;
  }
  // Still trimming a few hundredths of a millimetre after MAX_ROUNDS (a sheet printed by another renderer
  // places pictures and type a few hundredths apart): the last fit stands while it keeps most of the sites.
  return last && last.inliers.length >= Math.max(MIN_SITES, found.length / 2) ? last : null;
}

/**
 * Rounds of outlier trimming. Four left 25 of 32 sites on a 300 dpi sheet still losing one a round at residuals
 * of 0.3–0.44 px (0.03 mm), and the fit was thrown away: a correct scan refused as scan_mismatch.
 */
const MAX_ROUNDS = 6;

/** Misfit of each pair in artwork px: scan-side distance converted back through the fitted scale. */
function residuals(found: Measure[], map: Affine, fit: Affine): number[] {
  const s = Math.sqrt(Math.abs(fit[0] * fit[4] - fit[1] * fit[3]));
  return found.map((m) => {
    const q = apply(map, m.at[0] + m.off[0], m.at[1] + m.off[1]);
    const p = apply(fit, m.at[0], m.at[1]);
    return Math.hypot(q[0] - p[0], q[1] - p[1]) / s;
  });
}
