// Pairs of (artwork colour, scan colour) for the colour fit, read straight through the artwork → scan affine so
// that no full-size warped copy of the scan is needed. The artwork's side of the grid (positions, window means,
// flatness) is the same for every sheet and is kept per artwork and thread. "Flat" pairs lie where the artwork is uniform over the
// whole radius of the low-pass and registration tolerance, so misregistration cannot bias them; "all" pairs
// (window means of both) feed the percentile anchors of the tone curves.
import { ArtworkCache } from "../compare/artwork-cache";
import { linearToSrgb255Fast, SRGB8_TO_LINEAR } from "./colour";
import type { PxRect } from "../raster";
import type { Affine, RgbaImage } from "../types";

export interface SamplePairs {
  flatArt: Float32Array;
  flatScan: Float32Array;
  /** Artwork pixel of each flat pair (x, y; 2 a pair). */
  flatPos: Float32Array;
  flatCount: number;
  allArt: Float32Array;
  allScan: Float32Array;
  allCount: number;
  /** Window means of both where the artwork is smooth but not flat (gradients, pictures): see SMOOTH_TOLERANCE. */
  smoothArt: Float32Array;
  smoothScan: Float32Array;
  smoothCount: number;
}

const TARGET_GRID_POINTS = 60_000;
/** A flat artwork window varies by at most this many 8-bit codes per channel. */
const FLAT_TOLERANCE = 2;
/**
 * A smooth artwork window varies by at most this many codes: a gradient or a soft picture, whose colours may
 * appear nowhere flat on the sheet. Their window means pair well (a small misregistration moves the mean of a
 * smooth window little), and without them the colour model guesses those colours: a sky gradient printed in
 * every up of a multi-up sheet came out ΔE00 9 off, one colour-shift finding an up, on the second simulator.
 */
const SMOOTH_TOLERANCE = 8;

/** The artwork's side of the sampling grid: positions, window means and flatness. Artwork-only, so kept per artwork. */
interface ArtworkGrid {
  x: Int32Array;
  y: Int32Array;
  /** Window mean (3 a point) and, for flat points, the pixel itself (3 a point). */
  mean: Float32Array;
  pixel: Float32Array;
  /** FLAT, SMOOTH or 0. */
  flat: Uint8Array;
  count: number;
}

const grids = new ArtworkCache<ArtworkGrid>();

function artworkGrid(artwork: RgbaImage, radiusPx: number): ArtworkGrid {
  return grids.get(artwork, String(radiusPx), () => makeGrid(artwork, radiusPx));
}

function makeGrid(artwork: RgbaImage, radiusPx: number): ArtworkGrid {
  const r = Math.max(1, Math.ceil(radiusPx));
  const aw = artwork.width, ah = artwork.height;
  const stride = Math.max(2, Math.ceil(Math.sqrt((aw * ah) / TARGET_GRID_POINTS)));
  const kArt = Math.max(1, Math.round(radiusPx / 3));
  const cap = Math.ceil(aw / stride + 1) * Math.ceil(ah / stride + 1);
  const grid: ArtworkGrid = { x: new Int32Array(cap), y: new Int32Array(cap), mean: new Float32Array(cap * 3), pixel: new Float32Array(cap * 3), flat: new Uint8Array(cap), count: 0 };
  const art = artwork.data;
  for (let y = r; y < ah - r; y += stride) {
    for (let x = r; x < aw - r; x += stride) {
      const i = grid.count++;
      grid.x[i] = x;
      grid.y[i] = y;
      windowMean(art, aw, x, y, kArt, grid.mean, i * 3);
      const p = (y * aw + x) * 4;
      grid.pixel[i * 3] = art[p]; grid.pixel[i * 3 + 1] = art[p + 1]; grid.pixel[i * 3 + 2] = art[p + 2];
      grid.flat[i] = flatness(art, aw, x, y, r);
    }
  }
  return grid;
}

/** Window mean in linear light (then encoded again), so a blurred edge averages like the sharp one. */
function windowMean(data: Uint8Array | Uint8ClampedArray, width: number, cx: number, cy: number, k: number, out: Float32Array, o: number): void {
  const lin = SRGB8_TO_LINEAR;
  let s0 = 0, s1 = 0, s2 = 0;
  for (let yy = cy - k; yy <= cy + k; yy++) {
    for (let xx = cx - k, p = (yy * width + xx) * 4; xx <= cx + k; xx++, p += 4) {
      s0 += lin[data[p]]; s1 += lin[data[p + 1]]; s2 += lin[data[p + 2]];
    }
  }
  const n = (2 * k + 1) * (2 * k + 1);
  out[o] = linearToSrgb255Fast(s0 / n); out[o + 1] = linearToSrgb255Fast(s1 / n); out[o + 2] = linearToSrgb255Fast(s2 / n);
}

export function sampleFlatPairs(
  artwork: RgbaImage,
  scan: RgbaImage,
  m: Affine,
  inside: PxRect,
  radiusPx: number,
): SamplePairs {
  const r = Math.max(1, Math.ceil(radiusPx));
  const x0 = inside.x + r, y0 = inside.y + r;
  const x1 = inside.x + inside.w - r, y1 = inside.y + inside.h - r;
  const grid = artworkGrid(artwork, radiusPx);
  const cap = grid.count;
  const flatArt = new Float32Array(cap * 3), flatScan = new Float32Array(cap * 3), flatPos = new Float32Array(cap * 2);
  const allArt = new Float32Array(cap * 3), allScan = new Float32Array(cap * 3);
  const smoothArt = new Float32Array(cap * 3), smoothScan = new Float32Array(cap * 3);
  let flatCount = 0, allCount = 0, smoothCount = 0;
  const sd = scan.data, sw = scan.width, sh = scan.height;
  const scale = Math.sqrt(Math.abs(m[0] * m[4] - m[1] * m[3]));
  const kScan = Math.max(1, Math.round(Math.max(1, Math.round(radiusPx / 3)) * scale));
  for (let i = 0; i < grid.count; i++) {
    const x = grid.x[i], y = grid.y[i];
    if (x < x0 || y < y0 || x >= x1 || y >= y1) continue;
    const xs = Math.round(m[0] * x + m[1] * y + m[2]);
    const ys = Math.round(m[3] * x + m[4] * y + m[5]);
    if (xs - kScan < 0 || ys - kScan < 0 || xs + kScan >= sw || ys + kScan >= sh) continue;
    const a = allCount * 3, f = flatCount * 3;
    allArt[a] = grid.mean[i * 3]; allArt[a + 1] = grid.mean[i * 3 + 1]; allArt[a + 2] = grid.mean[i * 3 + 2];
    windowMean(sd, sw, xs, ys, kScan, allScan, a);
    allCount++;
    if (grid.flat[i] === SMOOTH) {
      smoothArt.set(allArt.subarray(a, a + 3), smoothCount * 3);
      smoothScan.set(allScan.subarray(a, a + 3), smoothCount * 3);
      smoothCount++;
    }
    if (grid.flat[i] !== FLAT) continue;
    flatArt[f] = grid.pixel[i * 3]; flatArt[f + 1] = grid.pixel[i * 3 + 1]; flatArt[f + 2] = grid.pixel[i * 3 + 2];
    flatScan[f] = allScan[a]; flatScan[f + 1] = allScan[a + 1]; flatScan[f + 2] = allScan[a + 2];
    flatPos[flatCount * 2] = x; flatPos[flatCount * 2 + 1] = y;
    flatCount++;
  }
  return { flatArt, flatScan, flatPos, flatCount, allArt, allScan, allCount, smoothArt, smoothScan, smoothCount };
}

const FLAT = 1, SMOOTH = 2;

/** FLAT when the window around (cx, cy) stays within FLAT_TOLERANCE of its centre, SMOOTH within SMOOTH_TOLERANCE, else 0. */
function flatness(art: Uint8Array | Uint8ClampedArray, width: number, cx: number, cy: number, r: number): number {
  const c = (cy * width + cx) * 4;
  const r0 = art[c], g0 = art[c + 1], b0 = art[c + 2];
  let most = 0;
  for (let yy = cy - r; yy <= cy + r; yy++) {
    for (let xx = cx - r, p = (yy * width + xx) * 4; xx <= cx + r; xx++, p += 4) {
      most = Math.max(most, Math.abs(art[p] - r0), Math.abs(art[p + 1] - g0), Math.abs(art[p + 2] - b0));
      if (most > SMOOTH_TOLERANCE) return 0;
    }
  }
  return most <= FLAT_TOLERANCE ? FLAT : SMOOTH;
}
