// A simulated press sheet scan with ground truth: printed sheet (the artwork, or a second rendering with a
// changed word) → planted defects → press photometry → placement on the scanner → scanner photometry.
// Deterministic for a given seed.
import type { Affine } from "@/lib/imaging/align/affine";
import type { ArtworkRaster, RgbaImage, ScanImage } from "@/lib/imaging/types";
import { applyDefects, type DefectSpec, type DefectTruth } from "./defects";
import { placeOnGlass, type GlassOptions } from "./geometry";
import { applyPress, applyScanner, type PressOptions, type ScannerOptions } from "./photometric";
import { seeded } from "./random";

export interface SimulateOptions {
  /** Sheet placement on the scanner glass; the scan is the printed sheet itself (identity) when absent. */
  geometry?: GlassOptions;
  photometric?: { press?: PressOptions; scanner?: ScannerOptions };
  defects?: DefectSpec[];
  seed?: number;
  /** What was printed when it differs from the artwork (same size and resolution), e.g. a changed word. */
  printed?: RgbaImage;
}

export interface SimulatedSheet {
  scan: ScanImage;
  truth: DefectTruth[];
  /** True artwork px → scan px map. */
  artworkToScan: Affine;
}

export async function simulateSheet(artwork: ArtworkRaster, opts: SimulateOptions = {}): Promise<SimulatedSheet> {
  const random = seeded(opts.seed ?? 1);
  const source = opts.printed ?? artwork;
  if (source.width !== artwork.width || source.height !== artwork.height) {
    throw new Error("The printed sheet must have the artwork's size and resolution.");
  }
  const printed = { width: artwork.width, height: artwork.height, dpi: artwork.dpi, data: new Uint8Array(source.data) };
  const truth = applyDefects(printed, opts.defects ?? []);
  applyPress(printed, opts.photometric?.press ?? {});
  let onGlass: { width: number; height: number; dpi: number; data: Uint8Array | Uint8ClampedArray } = printed;
  let artworkToScan: Affine = [1, 0, 0, 0, 1, 0];
  if (opts.geometry) {
    const glass = placeOnGlass({ ...artwork, data: printed.data }, opts.geometry);
    onGlass = glass.scan;
    artworkToScan = glass.artworkToScan;
  }
  const data = await applyScanner(onGlass, opts.photometric?.scanner ?? {}, random);
  return { scan: { width: onGlass.width, height: onGlass.height, dpi: onGlass.dpi, dpiSource: "caller", data }, truth, artworkToScan };
}
