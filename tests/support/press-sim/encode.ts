// Scan files as QA's scanners write them: JPEG (4:2:0 or 4:4:4), PNG, and 8- or 16-bit LZW TIFF converted to
// and tagged with the Display P3 profile (a non-sRGB space), each with its resolution in the file.
import sharp from "sharp";
import { srgbDecode, srgbEncode } from "./colour";
import type { ScanRaster } from "./scanner";

/** Linear sRGB → linear Display P3 (both D65; the P3 primaries of SMPTE EG 432-1 with the sRGB tone curve). */
export const SRGB_TO_P3 = [
  [0.8225, 0.1774, 0.0],
  [0.0332, 0.9669, 0.0],
  [0.0171, 0.0724, 0.9108],
] as const;

export function srgbToP3(rgb: readonly number[]): [number, number, number] {
  const lin = rgb.map(srgbDecode);
  return SRGB_TO_P3.map((row) => srgbEncode(Math.min(1, Math.max(0, row[0] * lin[0] + row[1] * lin[1] + row[2] * lin[2])))) as [number, number, number];
}

export type ScanFormat = "jpeg-420" | "jpeg-444" | "png" | "tiff8-p3" | "tiff16-p3";
export const SCAN_FORMATS: ScanFormat[] = ["jpeg-420", "jpeg-444", "png", "tiff8-p3", "tiff16-p3"];

export const extension = (f: ScanFormat) => (f.startsWith("jpeg") ? "jpg" : f === "png" ? "png" : "tif");

export async function encodeScan(scan: ScanRaster, format: ScanFormat, jpegQuality = 90): Promise<Buffer> {
  const n = scan.width * scan.height * 3;
  const deep = format === "tiff16-p3";
  let image;
  if (deep) {
    // sharp 0.35 tags a 16-bit image with the profile without converting its pixels (seen here), so the
    // conversion to P3 is done here; press-sim.test.ts checks the stored values either way.
    const data = new Uint16Array(n);
    for (let i = 0; i < n; i += 3) {
      const p3 = srgbToP3([scan.rgb[i], scan.rgb[i + 1], scan.rgb[i + 2]]);
      for (let c = 0; c < 3; c++) data[i + c] = Math.round(p3[c] * 65535);
    }
    image = sharp(data, { raw: { width: scan.width, height: scan.height, channels: 3 } }).toColourspace("rgb16");
  } else {
    const data = Buffer.alloc(n);
    for (let i = 0; i < n; i++) data[i] = Math.round(scan.rgb[i] * 255);
    image = sharp(data, { raw: { width: scan.width, height: scan.height, channels: 3 } });
  }
  image = image.withMetadata({ density: scan.dpi });
  switch (format) {
    case "jpeg-420":
    case "jpeg-444":
      return image.jpeg({ quality: jpegQuality, chromaSubsampling: format === "jpeg-444" ? "4:4:4" : "4:2:0" }).toBuffer();
    case "png":
      return image.png({ compressionLevel: 6 }).toBuffer();
    default:
      // withMetadata first: after withIccProfile it would put an sRGB profile back.
      return image.withIccProfile("p3").tiff({ compression: "lzw", xres: scan.dpi / 25.4, yres: scan.dpi / 25.4, resolutionUnit: "inch" }).toBuffer();
  }
}
