// Shared shapes of the inspection engine. Pure data: no database, storage, queue or HTTP.
// Coordinates: millimetres, origin top-left of the artwork page's trim box (media box when none), x right, y down.
// px = mm × dpi / 25.4.

/** An 8-bit RGBA image, rows top to bottom, 4 bytes a pixel. */
/** The engine's one 2 × 3 affine, [a, b, c, d, e, f]: x' = a·x + b·y + c, y' = d·x + e·y + f (artwork → scan and every map composed from it). */
export type Affine = readonly [number, number, number, number, number, number];

export interface RgbaImage {
  width: number;
  height: number;
  data: Uint8Array | Uint8ClampedArray;
}

/** A rasterised artwork page: RGBA plus its exact px↔mm mapping. */
export interface ArtworkRaster extends RgbaImage {
  dpi: number;
  /** Size of the trim box (or media box) in mm. */
  widthMm: number;
  heightMm: number;
  /** Which PDF box was used for the page area. */
  box: "TrimBox" | "MediaBox";
}

/** A decoded scan, converted to sRGB. */
export interface ScanImage extends RgbaImage {
  dpi: number;
  /** Where the resolution came from; "measured": the file said nothing and the resolution was estimated from the scan against the page (cli.ts). */
  dpiSource: "file" | "caller" | "unknown" | "measured";
}

export interface RectMm {
  x: number;
  y: number;
  w: number;
  h: number;
}

/** Multi-up layout of the artwork page: rows × columns of identical ups inside a rectangle. */
export interface UpsLayout {
  rows: number;
  columns: number;
  /** Area the ups occupy in mm; the whole page when absent. */
  areaMm?: RectMm;
}

export interface Alignment {
  /** Turn of the sheet on the scan, degrees, clockwise as seen on screen (y down), −180 … 180. */
  rotationDeg: number;
  /** Size on the scan relative to the artwork's true size (the resolutions' ratio taken out). */
  scale: number;
  /** Where the page's top-left corner lies on the scan, mm from the scan's top-left. */
  txMm: number;
  tyMm: number;
  /** RMS misfit of the final fit (artwork px and mm). */
  residualPx: number;
  residualMm: number;
  /** Correlation of the aligned pair (1 = identical structure); used to refuse a wrong artwork. */
  correlation: number;
  /** Share (0–1, score-weighted) of the fine registration patches that matched where the fit says. */
  patchAgreement?: number;
  /** Affine map from artwork px to scan px: [a, b, c, d, e, f] with xs = a·x + b·y + c, ys = d·x + e·y + f. */
  artworkToScan: Affine;
  /** Part of the artwork page the scan covers, in mm (bounding box; the warp's mask is exact). */
  coveredMm: RectMm;
  /** Local displacements for paper stretch on top of artworkToScan (optional local refinement). */
  localField?: DisplacementField;
}

/**
 * A grid of displacements in artwork px: the scan point of artwork pixel p is artworkToScan(p + d(p)), d
 * bilinear between nodes (held constant beyond the outer nodes). Node (i, j) sits at artwork pixel
 * (originX + i·step, originY + j·step); dx, dy are row-major, rows × cols.
 */
export interface DisplacementField {
  originX: number;
  originY: number;
  step: number;
  cols: number;
  rows: number;
  dx: number[];
  dy: number[];
}

/** Spots (extra_ink) and voids (missing_ink), colour shifts, changed or missing text or linework, streaks and scratches. */
export type FindingKind = "extra_ink" | "missing_ink" | "colour_shift" | "changed_text" | "streak";

export interface Finding {
  xMm: number;
  yMm: number;
  wMm: number;
  hMm: number;
  areaMm2: number;
  kind: FindingKind;
  deltaE00Mean: number;
  deltaE00Max: number;
  /** 1-based index of the up the finding lies in (row-major), null when outside every up or no layout. */
  up: number | null;
  /** PNG crops of artwork, aligned scan and difference around the finding. */
  crops?: { artwork: Buffer; scan: Buffer; difference: Buffer };
}

export interface ToleranceProfile {
  name: string;
  label: string;
  /** Smallest defect to report, as the diameter of a round mark (mm). */
  minDefectMm: number;
  /** ΔE00 above which a flat area counts as a colour shift. */
  deltaE00Threshold: number;
  /** Residual misregistration along edges that is not a defect (mm). */
  registrationToleranceMm: number;
  /** Areas that legitimately differ (variable data such as the inkjet sheet number), mm. */
  excludedAreasMm: RectMm[];
}

export type InspectionStage = "align" | "normalise" | "compare" | "findings";

export interface InspectionProgress {
  stage: InspectionStage;
  /** 0–100 across the whole inspection. */
  percent: number;
}

export interface InspectionResult {
  alignment: Alignment;
  coveredMm: RectMm;
  /** Uniform colour drift of the sheet, reported once. */
  drift: { deltaE00: number };
  findings: Finding[];
  timingsMs: Record<string, number>;
  /**
   * The same time by pass, inside the stages (ms): the per-sheet fits (colour fit, scanner blur) and each
   * per-pixel pass of the bands (warp, low-pass, colour map, pixelmatch screen, CIELAB comparison).
   */
  passesMs: Record<string, number>;
}

/** A refusal or bad input the caller can act on; `code` is stable, `message` is plain words. */
export class ImagingError extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
    this.name = "ImagingError";
  }
}
