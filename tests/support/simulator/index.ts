// A simulated press sheet scan with ground truth: printed sheet (the artwork, or a second rendering with a
// changed word) → planted defects → press photometry → placement on the scanner → scanner photometry.
// Deterministic for a given seed.
import type { RgbaImage, ScanImage } from "@/lib/imaging/types";
import { applyDefects, type DefectSpec, type DefectTruth } from "./defects";
import { applyPress, applyScanner, type PressOptions, type ScannerOptions } from "./photometric";
import { seeded } from "./random";

export interface SimulateOptions {
  /** Sheet placement on the scanner; identity when absent. */
  geometry?: undefined;
  photometric?: { press?: PressOptions; scanner?: ScannerOptions };
  defects?: DefectSpec[];
  seed?: number;
  /** What was printed when it differs from the artwork (same size and resolution), e.g. a changed word. */
  printed?: RgbaImage;
}

export interface SimulatedSheet {
  scan: ScanImage;
  truth: DefectTruth[];
}

export async function simulateSheet(artwork: RgbaImage & { dpi: number }, opts: SimulateOptions = {}): Promise<SimulatedSheet> {
  const random = seeded(opts.seed ?? 1);
  const source = opts.printed ?? artwork;
  if (source.width !== artwork.width || source.height !== artwork.height) {
    throw new Error("The printed sheet must have the artwork's size and resolution.");
  }
  const printed = { width: artwork.width, height: artwork.height, dpi: artwork.dpi, data: new Uint8Array(source.data) };
  const truth = applyDefects(printed, opts.defects ?? []);
  applyPress(printed, opts.photometric?.press ?? {});
  const data = await applyScanner(printed, opts.photometric?.scanner ?? {}, random);
  return { scan: { width: printed.width, height: printed.height, dpi: printed.dpi, dpiSource: "caller", data }, truth };
}
