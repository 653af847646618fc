// ALIGN: register a scan of a press sheet to its artwork raster, coarse to fine.
//
//  1. coarse placement (coarse.ts): whole-page correlation over the four quarter turns × ±6° (recovers
//     ±7°), swept on ~1 000-pixel grey levels and placed on ~4 000-pixel ones — robust to repeated ups, where
//     feature matching locks an up off;
//  2. affine ECC (OpenCV findTransformECC; G. D. Evangelidis & E. Z. Psarakis, "Parametric image alignment
//     using enhanced correlation coefficient maximization", IEEE TPAMI 30(10), 2008 — cited from memory) on
//     that level and on one twice as fine. ECC is exact sub-pixel and its correlation refuses a plainly wrong artwork, but costs ~80 ns per
//     pixel and iteration in the WebAssembly build (1.3 s on 1000 × 1000), so it only runs on ~4 000- and
//     ~16 000-pixel levels, cut to the part of the page the scan covers;
//  3. patches at the comparison resolution (patches.ts): small windows spread over the covered area,
//     each located to a fraction of a pixel, and a robust affine fit through them. This is where the last
//     tenth of a millimetre comes from, at a few per cent of the cost of a full-resolution ECC;
//  4. optionally a grid of local displacements on top of the affine for paper stretch.
//
// The scan's resolution may differ from the artwork's: it enters as the nominal scale, and the fitted scale
// is reported relative to it (1 = the sheet is scanned at its true size).
import { apply, coveredRect, compose, invert, scaling, translate, type Affine } from "./affine";
import { coarsePlacement, type CoarseResult } from "./coarse";
import { localField } from "./field";
import { refineOnPatches } from "./patches";
import { loadOpenCv, openCvMessage, withMats, type OpenCv } from "./opencv";
import { greyLevel, halve, levelToFull, type GreyLevel } from "./pyramid";
import { pxRectToMm, pxToMm } from "../raster";
import { ImagingError, type Alignment, type ArtworkRaster, type DisplacementField, type RgbaImage, type ScanImage } from "../types";

export { warpScanToArtwork } from "./warp";
export type { DisplacementField };

export interface AlignOptions {
  /** Fit a grid of local displacements for paper stretch on top of the affine map. */
  localRefinement?: boolean;
}

export interface AlignResult {
  alignment: Alignment;
  timingsMs: Record<string, number>;
}

/**
 * Refusal of a wrong artwork, in two steps. Below this ECC correlation on the ~16 000-pixel level the scan is
 * plainly something else (measured on simulated sheets: ≥ 0.99 for the right one; 0.42 for another imposition
 * when its fit got that far — since the two-level sweep its coarse fit runs off and is refused there). A design
 * of the same brand in another layout still reached 0.78 (and a sheet of another size 0.84) there, so the fine
 * patches decide too: the score-weighted share of structured sites that find their patch where the fit
 * says was 0.17–0.23 for those, 0.80–0.97 for right scans with halftone, blur, noise and JPEG.
 */
const MIN_CORRELATION = 0.7;
const MIN_AGREEMENT = 0.5;
/**
 * Coarse placements scoring within AMBIGUITY_SEARCH of the best are fitted too (a window onto identical ups:
 * on the ~4 000-pixel level a margin or crop mark is a pixel or less, and the sampling phase alone moved the
 * scores of equal windows by up to 0.03). A second fit whose finer-level correlation comes within
 * AMBIGUITY_RHO_GAP of the best means the scan fits two places. Measured on windows onto a 15-up sheet at
 * 100 dpi: 0.0002–0.0007 between placements one up apart along a sheet edge or with no edge in view (truly
 * ambiguous), 0.0097 for a window that held the sheet's corner, whose coarse scores lay within 0.01 of each other.
 */
const AMBIGUITY_SEARCH = 0.1;
const AMBIGUITY_RHO_GAP = 0.002;
/** Grey-level standard deviation (0–255) under which the scan shows nothing printed. */
const MIN_SCAN_CONTRAST = 2;
/** Pixels of the coarse level (the placement; the rotation sweep runs on a level with a quarter as many). */
const COARSE_PIXELS = 4_000;
/** Level pixels kept clear of the page edge in ECC. */
const EDGE = 3;

export async function alignScan(artwork: ArtworkRaster, scan: ScanImage, opts: AlignOptions = {}): Promise<AlignResult> {
  checkImage(artwork, "artwork");
  checkImage(scan, "scan");
  const cv = await loadOpenCv();
  const timings: Record<string, number> = {};
  let t0 = performance.now();
  const lap = (name: string) => {
    const t = performance.now();
    timings[name] = Math.round((t - t0) * 10) / 10;
    t0 = t;
  };

  // Level sizes follow the smaller of page and scan, so a scan of a corner of a large sheet keeps detail.
  const areaMm2 = Math.min(pxToMm(artwork.width, artwork.dpi) * pxToMm(artwork.height, artwork.dpi), pxToMm(scan.width, scan.dpi) * pxToMm(scan.height, scan.dpi));
  const coarseMm = Math.min(8, Math.max(0.4, Math.sqrt(areaMm2 / COARSE_PIXELS)));

  // One pass over each full image gives the ECC level; the coarse level is its 2 × 2 reduction.
  const kE = (dpi: number) => Math.max(1, Math.round((coarseMm * dpi) / 2 / 25.4));
  const artE = greyLevel(artwork, kE(artwork.dpi), true);
  const artC = greyLevel(artwork, 2 * artE.k, true);
  const scanE = greyLevel(scan, kE(scan.dpi));
  const scanC = halve(scanE);
  if (std(scanC.data) < MIN_SCAN_CONTRAST) throw mismatch();
  if (std(artC.data) < MIN_SCAN_CONTRAST) throw new ImagingError("artwork_blank", "the artwork has nothing printed to align the scan to");
  lap("levels");

  const ratio = scan.dpi / scanC.k / (artwork.dpi / artC.k);
  const sweep = { art: greyLevel(artwork, 2 * artC.k, true), scan: halve(scanC) };
  const coarse = coarsePlacement(cv, artC, scanC, ratio, sweep);
  let map = levelMapToFull(coarse.map, artC.k, scanC.k);
  lap("coarse");

  // ECC on the coarse level (cheap, widens the basin), then on the twice finer one; the patches do the rest.
  // The finer ECC gets few iterations: at ~1 ms each there it is the dearest, and started from the coarse fit
  // its third iteration leaves the patches' first offsets as small as its thirtieth did (measured: medians
  // ≤ 0.37 px at 100 dpi over all quarter turns ±7°); without it they were ~4 px, near the patches' radius.
  const nominal = scan.dpi / artwork.dpi;
  const sameScale = Math.abs(ratio - 1) < 0.02;
  const place = (rigid: boolean) => {
    const fitEcc = (start: Affine) => {
      const begin = rigid ? ecc(cv, artC, scanC, start, nominal, 50, true).map : start;
      const m = ecc(cv, artC, scanC, begin, nominal, 50).map;
      return ecc(cv, artE, scanE, m, nominal, 3);
    };
    let { map: eccMap, rho } = firstFit(coarse, (m) => fitEcc(levelMapToFull(m, artC.k, scanC.k)));
    // Other placements the coarse level found nearly as good (a window onto repeated ups): each is fitted as
    // the first was, and the finer level's correlation chooses; two that fit alike mean the scan cannot be placed.
    let runnerRho = -1;
    for (const alt of coarse.alternatives) {
      if (alt.score < coarse.score - AMBIGUITY_SEARCH) continue;
      let fit: { map: Affine; rho: number };
      try {
        fit = fitEcc(levelMapToFull(alt.map, artC.k, scanC.k));
      } catch (e) {
        if (e instanceof ImagingError) continue;
        throw e;
      }
      if (samePlace(fit.map, eccMap, artwork, scan)) continue;
      if (fit.rho > rho) {
        runnerRho = Math.max(runnerRho, rho);
        ({ map: eccMap, rho } = fit);
      } else runnerRho = Math.max(runnerRho, fit.rho);
    }
    lap("ecc");
    if (!(rho >= MIN_CORRELATION)) throw mismatch();
    const refined = refineOnPatches(cv, artwork, scan, eccMap);
    lap("patches");
    if (refined.agreement !== null && refined.agreement < MIN_AGREEMENT) throw mismatch();
    return { rho, runnerRho, refined };
  };
  // On a coarse level of few pixels the affine ECC can trade scale in one axis for correlation (a correct
  // 1-up label at 200 dpi, turned −91.5°, ran to 0.87 × 0.98 and was refused). When it fails, the placement is
  // tried again with a rotation-and-shift ECC first, held to the scanner's known scale. Only as a fallback: run
  // first on every sheet, that step misplaced a fifth of the training sheets.
  let placed: ReturnType<typeof place>;
  try {
    placed = place(false);
  } catch (e) {
    if (!sameScale || !(e instanceof ImagingError) || e.code !== "scan_mismatch") throw e;
    placed = place(true);
  }
  const { rho, runnerRho, refined } = placed;
  map = refined.map;
  // Only a scan that matches is worth this question: it fits, but would it fit elsewhere as well?
  if (runnerRho > rho - AMBIGUITY_RHO_GAP) {
    throw new ImagingError("scan_ambiguous", "the scan shows only repeated parts of the sheet and cannot be placed; include a sheet edge or margin in the scan");
  }

  const f = refined.fine;
  const field = opts.localRefinement && f ? localField(cv, f.art, scan, map, f.toFull, f.cover, f.dpi) : undefined;
  if (opts.localRefinement) lap("field");
  const alignment = describe(artwork, scan, map, rho, refined.residualPx, field);
  if (refined.agreement !== null) alignment.patchAgreement = round(refined.agreement, 1e4);
  return { alignment, timingsMs: timings };
}

function describe(artwork: ArtworkRaster, scan: ScanImage, map: Affine, rho: number, residualPx: number, field?: DisplacementField): Alignment {
  const nominal = scan.dpi / artwork.dpi;
  const det = map[0] * map[4] - map[1] * map[3];
  const covered = coveredRect(map, artwork.width, artwork.height, scan.width, scan.height);
  if (!covered) throw mismatch();
  // Where the top-left corner of the page (pixel edge −0.5, −0.5) lands on the scan, in mm of the scan.
  const cx = map[0] * -0.5 + map[1] * -0.5 + map[2] + 0.5;
  const cy = map[3] * -0.5 + map[4] * -0.5 + map[5] + 0.5;
  const alignment: Alignment = {
    rotationDeg: round((Math.atan2(map[3], map[0]) * 180) / Math.PI, 1e4),
    scale: round(Math.sqrt(Math.abs(det)) / nominal, 1e6),
    txMm: round(pxToMm(cx, scan.dpi), 1e4),
    tyMm: round(pxToMm(cy, scan.dpi), 1e4),
    residualPx: round(residualPx, 1e3),
    residualMm: round(pxToMm(residualPx, artwork.dpi), 1e4),
    correlation: round(rho, 1e4),
    artworkToScan: map,
    coveredMm: pxRectToMm(covered, artwork.dpi),
  };
  if (field) alignment.localField = field;
  return alignment;
}

/**
 * Affine ECC on one pair of levels, started from `map` (full resolution, artwork → scan). The artwork level is
 * cut to the part the scan covers first: ECC's cost is per template pixel, and a partial scan of a large sheet
 * would otherwise pay for the whole page.
 */
function ecc(cv: OpenCv, art: GreyLevel, scan: GreyLevel, map: Affine, nominal: number, iterations: number, rigid = false) {
  const lm = compose(invert(levelToFull(scan.k)), compose(map, levelToFull(art.k)));
  const cover = coveredRect(lm, art.width, art.height, scan.width, scan.height);
  if (!cover) throw mismatch();
  // Keep EDGE level pixels clear of the page's edges: there the scan shows the sheet's edge against the lid,
  // which the artwork does not have, and ECC's smoothing would pull the fit towards it.
  const x0 = Math.max(EDGE, Math.floor(cover.x)), y0 = Math.max(EDGE, Math.floor(cover.y));
  const x1 = Math.min(art.width - EDGE, Math.ceil(cover.x + cover.w)), y1 = Math.min(art.height - EDGE, Math.ceil(cover.y + cover.h));
  if (x1 - x0 < 8 || y1 - y0 < 8) throw mismatch();
  const roi = compose(lm, translate(scaling(1), x0, y0));
  return withMats((keep) => {
    const full = keep(cv.matFromArray(art.height, art.width, cv.CV_32F, art.data));
    const templ = keep(full.roi(new cv.Rect(x0, y0, x1 - x0, y1 - y0)));
    const input = keep(cv.matFromArray(scan.height, scan.width, cv.CV_32F, scan.data));
    const warp = keep(cv.matFromArray(2, 3, cv.CV_32F, roi));
    const mask = keep(new cv.Mat());
    const criteria = new cv.TermCriteria(cv.TermCriteria_COUNT + cv.TermCriteria_EPS, iterations, 1e-6);
    let rho: number;
    try {
      rho = cv.findTransformECC(templ, input, warp, rigid ? cv.MOTION_EUCLIDEAN : cv.MOTION_AFFINE, criteria, mask, 5);
    } catch (e) {
      // ECC gives up when the images do not correlate at all ("images may be uncorrelated").
      const message = openCvMessage(cv, e);
      if (/uncorrelated|non-overlapped|converge/i.test(message)) throw mismatch();
      throw new Error(`ECC registration failed: ${message}`);
    }
    const [a, b, c, d, e, f] = warp.data32F as Float32Array;
    const w: Affine = [a, b, c, d, e, f];
    const found = levelMapToFull(compose(w, translate(scaling(1), -x0, -y0)), art.k, scan.k);
    // A fit that has run off (folded, or beyond ±10 % of the nominal size) is no registration at all.
    const det = found[0] * found[4] - found[1] * found[3];
    if (!found.every(Number.isFinite) || !(det > 0) || Math.abs(Math.sqrt(det) / nominal - 1) > 0.1) throw mismatch();
    return { map: found, rho };
  });
}

/**
 * The fit from the coarse level's best placement; when that runs off or correlates too little, the other
 * quarter turns the coarse level placed, then its other placements at the same angle, and the best of them. A
 * sheet of repeated ups looks much the same turned half round, and the coarse level may prefer the wrong turn
 * by a few hundredths (correct scans of 3-up cartons were refused that way).
 */
function firstFit(coarse: CoarseResult, fit: (levelMap: Affine) => { map: Affine; rho: number }): { map: Affine; rho: number } {
  let best: { map: Affine; rho: number } | null = null;
  for (const candidate of [coarse, ...coarse.otherTurns, ...coarse.alternatives]) {
    try {
      const found = fit(candidate.map);
      if (!best || found.rho > best.rho) best = found;
    } catch (e) {
      if (!(e instanceof ImagingError)) throw e;
    }
    if (best && best.rho >= MIN_CORRELATION) break;
  }
  if (!best) throw mismatch();
  return best;
}

/** Two maps place the scan alike when the scan's centre lands within a few artwork pixels under both. */
function samePlace(a: Affine, b: Affine, artwork: ArtworkRaster, scan: ScanImage): boolean {
  const cx = scan.width / 2, cy = scan.height / 2;
  const pa = apply(invert(a), cx, cy), pb = apply(invert(b), cx, cy);
  return Math.hypot(pa[0] - pb[0], pa[1] - pb[1]) < Math.max(3, artwork.dpi / 25.4);
}

function levelMapToFull(m: Affine, kArt: number, kScan: number): Affine {
  return compose(levelToFull(kScan), compose(m, invert(levelToFull(kArt))));
}

export function mismatch(): ImagingError {
  return new ImagingError("scan_mismatch", "the scan does not match this artwork");
}

function checkImage(img: RgbaImage & { dpi: number }, what: string) {
  if (!(img.width > 0 && img.height > 0 && img.data.length === img.width * img.height * 4)) {
    throw new ImagingError("bad_image", `the ${what} image is empty or its pixel data does not match its size`);
  }
  if (!(img.dpi > 0)) throw new ImagingError("bad_image", `the ${what} image has no resolution`);
}

function std(a: Float32Array): number {
  let s = 0, s2 = 0;
  for (let i = 0; i < a.length; i++) {
    s += a[i];
    s2 += a[i] * a[i];
  }
  const m = s / a.length;
  return Math.sqrt(Math.max(0, s2 / a.length - m * m));
}

const round = (v: number, f: number) => Math.round(v * f) / f;
