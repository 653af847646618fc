// The scan's resolution when its file does not say: estimated from its size against the page's, then measured
// by the alignment's fitted scale. A flatbed scan of a sheet holds the sheet and a margin of glass around it,
// so the side with the least margin says most: the smaller of the two ratios, snapped to a resolution scanners
// offer when it lies near one (the alignment fits the rest).
export const COMMON_SCAN_DPI = [75, 100, 150, 200, 240, 300, 400, 600, 800, 1200, 1600, 2400];
/** Snap when within this share of a common resolution (a margin of glass of up to about 6 % a side). */
const SNAP_WITHIN = 0.12;

export function estimateScanDpi(scan: { width: number; height: number }, page: { widthMm: number; heightMm: number }): number {
  const [scanLong, scanShort] = [Math.max(scan.width, scan.height), Math.min(scan.width, scan.height)];
  const [pageLong, pageShort] = [Math.max(page.widthMm, page.heightMm), Math.min(page.widthMm, page.heightMm)];
  const raw = Math.min(scanLong / (pageLong / 25.4), scanShort / (pageShort / 25.4));
  // Below a common value: a partial scan, or a page laid over the glass's edge; above it: the glass's margin.
  const near = COMMON_SCAN_DPI.find((d) => raw >= d * (1 - SNAP_WITHIN / 3) && raw <= d * (1 + SNAP_WITHIN));
  return near ?? Math.round(raw);
}

/** The resolution the alignment measured: the estimate times the scale it fitted (artwork px per scan px). */
export function measuredDpi(estimateDpi: number, fittedScale: number): number {
  return Math.round(estimateDpi * fittedScale * 10) / 10;
}
