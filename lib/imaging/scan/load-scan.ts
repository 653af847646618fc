// Scan file (TIFF 8/16-bit with any compression sharp reads, PNG, JPEG) → 8-bit sRGB RGBA with its resolution.
//
// Colour: an embedded ICC profile is honoured. Matrix/TRC RGB profiles (Adobe RGB, Display P3, most scanner
// "working space" profiles) are converted by our own code in ./icc.ts from the stored samples (read with
// ignoreIcc), because sharp 0.35.5 leaves 16-bit TIFFs with such profiles unconverted in raw output. Other
// profiles (LUT-based, CMYK, grey) go through sharp's own conversion (lcms) with withIccProfile("srgb").
// Resolution: the caller's value wins when given (a scanner may write a wrong one), else the file's, else error.
import sharp, { type Metadata } from "sharp";
import { convertToSrgb, isSrgbLike, parseIccProfile } from "./icc";
import { ImagingError, type ScanImage } from "../types";

/** Largest scan decoded by default: a B1 sheet at 300 dpi is 98.6 megapixels. */
export const DEFAULT_MAX_SCAN_MEGAPIXELS = 150;
export const MIN_SCAN_DPI = 50;
export const MAX_SCAN_DPI = 2400;
const FORMATS = new Set(["tiff", "png", "jpeg"]);

export interface LoadScanOptions {
  /** Resolution of the scan; overrides the file's when given. */
  dpi?: number;
  maxMegapixels?: number;
  /** A file without a resolution tag loads with dpi 0 and dpiSource "unknown" (the caller measures it) instead of failing. */
  allowUnknownDpi?: boolean;
  /** "library" forces sharp's conversion for every profile (used to cross-check our own). */
  iccConversion?: "auto" | "library";
}

export type ColourConversion = "none" | "icc-matrix" | "icc-library";

export interface LoadedScan extends ScanImage {
  format: string;
  bitsPerSample: 8 | 16;
  /** Which path turned the file's colours into sRGB. */
  colourConversion: ColourConversion;
  /** Description of the embedded profile, "" when none. */
  profile: string;
}

/** Decodes a scan into 8-bit sRGB RGBA (alpha 255), refusing oversize, unsupported or damaged files. */
export async function loadScan(bytes: Uint8Array, opts: LoadScanOptions = {}): Promise<LoadedScan> {
  const { maxMegapixels = DEFAULT_MAX_SCAN_MEGAPIXELS, iccConversion = "auto" } = opts;
  const limitInputPixels = Math.floor(maxMegapixels * 1e6);
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: false }).metadata();
  } catch (err) {
    throw new ImagingError("scan_unreadable", `The scan cannot be read as an image (${firstLine(err)}). Upload a TIFF, PNG or JPEG.`);
  }
  if (!meta.format || !FORMATS.has(meta.format)) {
    throw new ImagingError("scan_unsupported", `Scans must be TIFF, PNG or JPEG; this file is ${meta.format ?? "of an unknown format"}.`);
  }
  const width = meta.autoOrient?.width ?? meta.width;
  const height = meta.autoOrient?.height ?? meta.height;
  if (!width || !height) throw new ImagingError("scan_unreadable", "The scan's header gives no image size.");
  // Checked from the header, before any pixel is decoded: a hostile header cannot make us allocate.
  if (width * height > limitInputPixels) {
    throw new ImagingError(
      "scan_too_large",
      `The scan is ${width} × ${height} px (${((width * height) / 1e6).toFixed(1)} megapixels), above the limit of ` +
        `${maxMegapixels}. Scan at a lower resolution or split the sheet.`,
    );
  }
  const unknown = opts.allowUnknownDpi === true && opts.dpi === undefined && !(meta.density! > 0);
  const dpi = unknown ? 0 : resolveDpi(opts.dpi, meta.density);
  const bitsPerSample = meta.depth === "ushort" ? 16 : 8;
  if (meta.depth && meta.depth !== "uchar" && meta.depth !== "ushort") {
    throw new ImagingError("scan_unsupported", `Scans must have 8 or 16 bits a sample; this one stores ${meta.depth}.`);
  }

  const parsed = meta.icc ? parseIccProfile(meta.icc) : null;
  const profile = parsed ? (parsed.kind === "matrix" ? parsed.profile.description : parsed.description) : "";
  const input = () => sharp(bytes, { limitInputPixels, failOn: "error", autoOrient: true, ignoreIcc: true });
  try {
    if (parsed?.kind === "matrix" && iccConversion === "auto" && meta.space !== "b-w") {
      if (isSrgbLike(parsed.profile)) return await decodeStored("none");
      const base = input().removeAlpha();
      const raw =
        bitsPerSample === 16
          ? await base.toColourspace("rgb16").raw({ depth: "ushort" }).toBuffer({ resolveWithObject: true })
          : await base.raw().toBuffer({ resolveWithObject: true });
      const { info, data } = raw;
      const samples = bitsPerSample === 16 ? new Uint16Array(data.buffer, data.byteOffset, data.byteLength / 2) : new Uint8Array(data);
      const out = convertToSrgb(samples, info.channels, parsed.profile, new Uint8Array(info.width * info.height * 4));
      return finish(out, info.width, info.height, "icc-matrix");
    }
    if (parsed) {
      const { data, info } = await sharp(bytes, { limitInputPixels, failOn: "error", autoOrient: true })
        .withIccProfile("srgb")
        .flatten({ background: "#ffffff" })
        .ensureAlpha(1)
        .raw()
        .toBuffer({ resolveWithObject: true });
      return finish(new Uint8Array(data.buffer, data.byteOffset, data.byteLength), info.width, info.height, "icc-library");
    }
    return await decodeStored("none");
  } catch (err) {
    if (err instanceof ImagingError) throw err;
    throw new ImagingError("scan_unreadable", `The scan's pixels cannot be decoded (${firstLine(err)}); the file may be damaged or cut short.`);
  }

  /** No profile (taken as sRGB, the usual assumption for untagged files) or an sRGB one: stored values. */
  async function decodeStored(conversion: ColourConversion): Promise<LoadedScan> {
    if (bitsPerSample === 16) {
      // sharp reduces 16-bit samples by truncation (v >> 8, up to a level too dark): reduce them ourselves.
      const { data, info } = await input().removeAlpha().toColourspace("rgb16").raw({ depth: "ushort" }).toBuffer({ resolveWithObject: true });
      const samples = new Uint16Array(data.buffer, data.byteOffset, data.byteLength / 2);
      return finish(reduce16(samples, info.channels, new Uint8Array(info.width * info.height * 4)), info.width, info.height, conversion);
    }
    const { data, info } = await input()
      .flatten({ background: "#ffffff" })
      .toColourspace("srgb")
      .ensureAlpha(1)
      .raw()
      .toBuffer({ resolveWithObject: true });
    return finish(new Uint8Array(data.buffer, data.byteOffset, data.byteLength), info.width, info.height, conversion);
  }

  function finish(data: Uint8Array, w: number, h: number, colourConversion: ColourConversion): LoadedScan {
    if (data.length !== w * h * 4) throw new ImagingError("scan_unreadable", `Decoded ${data.length} bytes for ${w} × ${h} RGBA.`);
    return {
      width: w,
      height: h,
      data,
      dpi,
      dpiSource: unknown ? "unknown" : opts.dpi !== undefined ? "caller" : "file",
      format: meta.format!,
      bitsPerSample,
      colourConversion,
      profile,
    };
  }
}

/** 16-bit samples → 8-bit RGBA by rounding v · 255 / 65535 (the nearest 8-bit level). */
export function reduce16(samples: Uint16Array, channels: number, out: Uint8Array): Uint8Array {
  const pixels = samples.length / channels;
  for (let p = 0, i = 0, o = 0; p < pixels; p++, i += channels, o += 4) {
    out[o] = (samples[i] * 255 + 32767) / 65535;
    out[o + 1] = (samples[i + 1] * 255 + 32767) / 65535;
    out[o + 2] = (samples[i + 2] * 255 + 32767) / 65535;
    out[o + 3] = 255;
  }
  return out;
}

function resolveDpi(caller: number | undefined, file: number | undefined): number {
  const dpi = caller ?? file;
  if (dpi === undefined) {
    throw new ImagingError("scan_dpi_unknown", "The scan file does not say its resolution; give the scan resolution in dpi.");
  }
  if (!Number.isFinite(dpi) || dpi < MIN_SCAN_DPI || dpi > MAX_SCAN_DPI) {
    const from = caller !== undefined ? "given" : "stored in the file";
    throw new ImagingError(
      "scan_dpi_out_of_range",
      `The scan resolution ${from} is ${dpi} dpi; it must be between ${MIN_SCAN_DPI} and ${MAX_SCAN_DPI}. Give the right value.`,
    );
  }
  return dpi;
}

function firstLine(err: unknown): string {
  return String((err as Error)?.message ?? err).split("\n")[0];
}
