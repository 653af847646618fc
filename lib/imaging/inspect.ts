// The inspection of one press sheet: align → normalise → compare → findings. The CLI and the worker call
// exactly this. Pure: typed arrays in, plain objects out; safe inside worker threads (nothing is shared between
// threads: each keeps its own prepared artwork and band buffers).
import { alignScan } from "./align/align";
import { alignedScanSource, borrowScratch, haloPx, processRect, returnScratch, type SheetContext } from "./compare/bands";
import { makeCrops } from "./findings/crops";
import { measureAllowances } from "./compare/allowances";
import { RegionCollector, regionsToFindings } from "./findings/findings";
import { fitNormalisation, lowPassSigmaPx } from "./colour/normalise";
import { estimateOpticalBlur, OPTICAL_BLUR_STEPS_PX, suggestBlurStep } from "./colour/optics";
import { CACHE_MAX_PIXELS, preparedPageIfKept, adoptPrepared, type ContrastWindows, type PreparedRect, type PreparedRows } from "./compare/prepared";
import { validateProfile } from "./profiles";
import { mmToPx, pxRectToMm, rectMmToPx, rectMmToPxInside, type PxRect } from "./raster";
import {
  ImagingError,
  type Alignment,
  type ArtworkRaster,
  type Finding,
  type InspectionProgress,
  type InspectionResult,
  type RgbaImage,
  type ScanImage,
  type ToleranceProfile,
  type UpsLayout,
} from "./types";

export interface InspectSheetInput {
  artwork: ArtworkRaster;
  scan: ScanImage;
  profile: ToleranceProfile;
  ups?: UpsLayout;
  /** Attach PNG crops to each finding. */
  crops?: boolean;
  onProgress?: (p: InspectionProgress) => void;
  /** An alignment already known (a pre-aligned scan, or one computed earlier); skips the align stage. */
  alignment?: Alignment;
  /** Where the artwork's prepared side is kept between processes (a file, the bucket). */
  prepared?: PreparedSupply;
}

/**
 * A store of the artwork's preparation (prepared.ts) outside this thread. The sheet's windows are known only
 * once its scanner blur is measured, so the store is asked then; when it has none, the sheet prepares the page
 * and hands it over to be kept.
 */
export interface PreparedSupply {
  /** The scanner blur (σ px) the stored preparation was made for: the blur search starts there. */
  blurHintPx?: number;
  /** The stored preparation for these windows (a whole page or rows on demand), or null. Never throws. */
  load(windows: ContrastWindows): Promise<PreparedRect | PreparedRows | null>;
  /** A whole page this sheet prepared (pages up to CACHE_MAX_PIXELS). */
  made?(windows: ContrastWindows, page: PreparedRect): Promise<void>;
}

/**
 * Pixels a band: up to 8 MP (a B2 sheet at 100 dpi in one band: each band costs a low-pass call, a screen and
 * its halo rows, 10 % of a sheet's CPU at 2 MP a band); 2 MP where the artwork is prepared band by band too
 * (pages over CACHE_MAX_PIXELS), which keeps a B1 sheet at 300 dpi within its memory bound.
 */
const BAND_PIXELS = 1 << 23;
const LARGE_PAGE_BAND_PIXELS = 1 << 21;
/**
 * Share of the smallest defect's area whose pixels must reach the profile's ΔE00 (the second level): a
 * 0.3 mm dot of pen ink on a light tint reaches it over only about half its area once low-passed.
 */
const STRONG_SHARE = 0.3;
/** Findings with crops attached at most; the rest still carry their boxes and figures. */
const MAX_CROPPED_FINDINGS = 100;

/** The windows of the artwork's preparation for a sheet at `dpi` (the same for every sheet of one scanner). */
export function contrastWindows(dpi: number, registrationToleranceMm: number, opticalBlurPx: number): ContrastWindows {
  const sigmaPx = lowPassSigmaPx(dpi);
  const radiusPx = Math.max(1, Math.ceil(mmToPx(registrationToleranceMm, dpi) - 0.25));
  return { opticalBlurPx, sigmaPx, radiusPx, reachPx: radiusPx + Math.ceil(2 * sigmaPx) };
}

/**
 * A flatbed's blur before any sheet of the run is measured, for preparing the artwork when it is approved:
 * about 0.04 mm (common practice for office and graphic-arts flatbeds, no published source), as the nearest
 * step tried. A run whose scanner measures otherwise prepares once more on its first sheet.
 */
export function likelyScannerBlurPx(dpi: number): number {
  const px = (0.04 * dpi) / 25.4;
  return OPTICAL_BLUR_STEPS_PX.reduce((best, s) => (Math.abs(s - px) < Math.abs(best - px) ? s : best));
}

export async function inspectSheet(input: InspectSheetInput): Promise<InspectionResult> {
  const { artwork, scan, ups, onProgress } = input;
  checkImage("artwork", artwork);
  checkImage("scan", scan);
  const profile = validateProfile(input.profile);
  const timings: Record<string, number> = { align: 0, normalise: 0, compare: 0, findings: 0 };
  const progress = (stage: InspectionProgress["stage"], percent: number) =>
    onProgress?.({ stage, percent: Math.round(Math.min(100, Math.max(0, percent))) });

  progress("align", 0);
  let started = performance.now();
  // A scan_mismatch (wrong artwork, blank scan) propagates from here as an ImagingError.
  const alignment = input.alignment ?? (await alignScan(artwork, scan)).alignment;
  timings.align = performance.now() - started;
  progress("normalise", 15);

  const dpi = artwork.dpi;
  const sigmaPx = lowPassSigmaPx(dpi);
  const radiusPx = Math.max(1, Math.ceil(mmToPx(profile.registrationToleranceMm, dpi) - 0.25));
  const peak = profile.deltaE00Threshold;
  const inspectPx = awayFromPageEdge(rectMmToPxInside(alignment.coveredMm, dpi, artwork.width, artwork.height), artwork, Math.ceil(3 * sigmaPx) + radiusPx);
  started = performance.now();
  const fit = fitNormalisation(artwork, scan, alignment.artworkToScan, inspectPx, Math.ceil(2.5 * sigmaPx) + radiusPx);
  const fitted = performance.now();
  if (input.prepared?.blurHintPx !== undefined) suggestBlurStep(artwork, input.prepared.blurHintPx);
  const opticalBlurPx = await estimateOpticalBlur(artwork, scan, alignment, fit.model, sigmaPx, inspectPx);
  timings.normalise += performance.now() - started;
  const passes: Record<string, number> = { colourFit: fitted - started, scannerBlur: performance.now() - fitted };

  const windows = contrastWindows(dpi, profile.registrationToleranceMm, opticalBlurPx);
  const keptBefore = preparedPageIfKept(artwork, windows) !== undefined;
  let loaded = false;
  if (input.prepared && !keptBefore) {
    started = performance.now();
    const stored = await input.prepared.load(windows);
    if (stored) adoptPrepared(artwork, windows, stored);
    loaded = stored !== null;
    passes.loadPrepared = performance.now() - started;
  }
  const scratch = borrowScratch();
  let findings: Finding[];
  try {
    const ctx: SheetContext = {
      artwork,
      source: alignedScanSource(scan, alignment, artwork, scratch.warp),
      model: fit.model,
      light: fit.light,
      sigmaPx,
      radiusPx,
      windows,
      lowDeltaE00: Math.max(1, 0.5 * peak),
      peakDeltaE00: peak,
      inspectPx,
      excludedPx: profile.excludedAreasMm.map((r) => rectMmToPx(r, dpi, artwork.width, artwork.height)),
      scratch: scratch.compare,
      timings: { normalise: 0, compare: 0 },
      passes: { warp: 0, lowPass: 0, colourMap: 0, screen: 0, cielab: 0 },
    };
    const allowances = await measureAllowances(ctx);
    ctx.edgeAllowance = allowances.edge;
    ctx.flatAllowance = allowances.flat;
    findings = await compareSheet(ctx, artwork, profile, { ups, crops: input.crops ?? false }, timings, progress);
    Object.assign(passes, ctx.passes);
  } finally {
    returnScratch(scratch);
  }
  const page = keptBefore || loaded ? undefined : preparedPageIfKept(artwork, windows);
  if (page && input.prepared?.made) await input.prepared.made(windows, page);
  progress("findings", 100);
  for (const t of [timings, passes]) for (const k of Object.keys(t)) t[k] = Math.round(t[k] * 10) / 10;
  return {
    alignment,
    coveredMm: alignment.coveredMm,
    drift: { deltaE00: Math.round(fit.driftDeltaE00 * 100) / 100 },
    findings,
    timingsMs: timings,
    passesMs: passes,
  };
}

/** Every band of the inspected area through normalise and compare, then the regions into findings. */
async function compareSheet(
  ctx: SheetContext,
  artwork: ArtworkRaster,
  profile: ToleranceProfile,
  options: { ups?: UpsLayout; crops: boolean },
  timings: Record<string, number>,
  progress: (stage: InspectionProgress["stage"], percent: number) => void,
): Promise<Finding[]> {
  const { inspectPx, peakDeltaE00: peak } = ctx;
  const dpi = artwork.dpi;
  const inkRegions = new RegionCollector(artwork.width, peak, false);
  const colourRegions = new RegionCollector(artwork.width, peak, true);
  const bandPixels = artwork.width * artwork.height > CACHE_MAX_PIXELS ? LARGE_PAGE_BAND_PIXELS : BAND_PIXELS;
  const bandRows = Math.max(64, Math.floor(bandPixels / artwork.width), haloPx(ctx) * 4);
  const yEnd = inspectPx.y + inspectPx.h;
  let started: number;
  for (let y = inspectPx.y; y < yEnd; y += bandRows) {
    const rows = Math.min(bandRows, yEnd - y);
    const diff = await processRect(ctx, { x: 0, y, w: artwork.width, h: rows });
    started = performance.now();
    inkRegions.addBand(diff, rows, y);
    colourRegions.addBand(diff, rows, y);
    timings.findings += performance.now() - started;
    progress("compare", 20 + (70 * (y + rows - inspectPx.y)) / Math.max(1, inspectPx.h));
  }
  timings.normalise += ctx.timings.normalise;
  timings.compare += ctx.timings.compare;

  progress("findings", 90);
  started = performance.now();
  const minAreaMm2 = (Math.PI / 4) * profile.minDefectMm ** 2;
  const { findings } = regionsToFindings([...inkRegions.regions(), ...colourRegions.regions()], {
    dpi,
    peakDeltaE00: peak,
    minStrongPx: Math.max(3, Math.round((STRONG_SHARE * minAreaMm2) / (25.4 / dpi) ** 2)),
    minAreaMm2,
    mergeMm: Math.max(0.6, 2 * profile.minDefectMm),
    ups: options.ups,
    pageMm: { widthMm: artwork.widthMm, heightMm: artwork.heightMm },
  });
  if (options.crops) {
    for (const f of findings.slice(0, MAX_CROPPED_FINDINGS)) f.crops = await makeCrops(ctx, f, dpi, peak);
  }
  timings.findings += performance.now() - started;
  return findings;
}

/**
 * The inspected area kept `marginPx` clear of the page's own edges: the artwork ends at its trim box while the
 * press sheet goes on (bleed, crop marks, the next up), so the two low-passes differ there along the whole edge.
 */
function awayFromPageEdge(r: PxRect, artwork: RgbaImage, marginPx: number): PxRect {
  const x0 = Math.max(r.x, marginPx), y0 = Math.max(r.y, marginPx);
  const x1 = Math.min(r.x + r.w, artwork.width - marginPx), y1 = Math.min(r.y + r.h, artwork.height - marginPx);
  return { x: x0, y: y0, w: Math.max(0, x1 - x0), h: Math.max(0, y1 - y0) };
}

/** The alignment of a scan already in the artwork's pixel grid (same size and resolution). */
export function identityAlignment(artwork: ArtworkRaster, scan: RgbaImage): Alignment {
  const w = Math.min(artwork.width, scan.width), h = Math.min(artwork.height, scan.height);
  return {
    rotationDeg: 0,
    scale: 1,
    txMm: 0,
    tyMm: 0,
    residualPx: 0,
    residualMm: 0,
    correlation: 1,
    artworkToScan: [1, 0, 0, 0, 1, 0],
    coveredMm: pxRectToMm({ x: 0, y: 0, w, h }, artwork.dpi),
  };
}

function checkImage(what: string, img: RgbaImage & { dpi: number }): void {
  if (!img || !Number.isInteger(img.width) || !Number.isInteger(img.height) || img.width < 8 || img.height < 8) {
    throw new ImagingError("bad_input", `The ${what} image must be at least 8 × 8 pixels.`);
  }
  if (!img.data || img.data.length !== img.width * img.height * 4) {
    throw new ImagingError("bad_input", `The ${what} pixel data must hold ${img.width * img.height * 4} bytes (RGBA). Got ${img.data?.length}.`);
  }
  if (!(img.dpi > 0) || !Number.isFinite(img.dpi)) {
    throw new ImagingError("bad_input", `The ${what} resolution must be a positive number of dots per inch.`);
  }
}
