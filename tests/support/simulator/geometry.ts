// Simulated scanner glass: lays an artwork raster on the glass turned (any quarter turn plus an angle),
// scaled, shifted, at the scanner's own resolution, with lid background around the sheet or with the glass
// seeing only part of the sheet. Returns the scan and the TRUE artwork px → scan px affine, so tests measure
// the registration error. Each scan pixel integrates its footprint (n × n sub-samples when the scan is
// coarser than the artwork, like a sensor cell), each sub-sample bilinear or bicubic (R. G. Keys, "Cubic
// convolution interpolation for digital image processing", IEEE Trans. ASSP 29(6), 1981, a = −0.5; cited
// from memory).
// Pixel centres sit at integer coordinates; the page spans −0.5 … width − 0.5.
import { invert, type Affine } from "@/lib/imaging/align/affine";
import type { ArtworkRaster, ScanImage } from "@/lib/imaging/types";

export interface GlassOptions {
  /** Turn of the sheet, degrees clockwise on screen (y down): quarter turns plus a small angle. */
  rotationDeg?: number;
  /** Size on the glass relative to true size (paper stretch, scanner scale error). */
  scale?: number;
  /** Scan resolution; default the artwork's. */
  dpi?: number;
  /** Scan size in mm; default the turned sheet's bounding box plus `marginMm` on every side. */
  sizeMm?: { w: number; h: number };
  marginMm?: number;
  /** Where the sheet's centre lies, mm from the scan's top-left; default the middle of the scan. */
  centreMm?: { x: number; y: number };
  /** Lid colour around the sheet; default a white-ish lid. */
  background?: [number, number, number];
  resampling?: "bilinear" | "bicubic";
  /** Paper stretch: a smooth displacement (mm) of each artwork point (mm from the page's top-left) before the
   * turn and scale, so the true map is no longer affine. Keep it small (a few tenths of a mm). */
  distortMm?: (xMm: number, yMm: number) => [number, number];
}

export interface GlassScan {
  scan: ScanImage;
  /** True artwork px → scan px, without the distortion. */
  artworkToScan: Affine;
  /** True scan position of an artwork pixel, distortion included. */
  scanPoint: (x: number, y: number) => [number, number];
}

export const WHITE_LID: [number, number, number] = [246, 245, 241];
export const GREY_LID: [number, number, number] = [62, 63, 66];

export function placeOnGlass(artwork: ArtworkRaster, o: GlassOptions = {}): GlassScan {
  const deg = o.rotationDeg ?? 0, s = o.scale ?? 1, dpi = o.dpi ?? artwork.dpi;
  const bg = o.background ?? WHITE_LID;
  const wMm = (artwork.width * 25.4) / artwork.dpi, hMm = (artwork.height * 25.4) / artwork.dpi;
  const r = (deg * Math.PI) / 180, c = Math.cos(r) * s, sn = Math.sin(r) * s;
  const margin = o.marginMm ?? 10;
  const size = o.sizeMm ?? {
    w: Math.abs(c) * wMm + Math.abs(sn) * hMm + 2 * margin,
    h: Math.abs(sn) * wMm + Math.abs(c) * hMm + 2 * margin,
  };
  const centre = o.centreMm ?? { x: size.w / 2, y: size.h / 2 };
  // artwork px → artwork mm about the sheet centre → turned and scaled → glass mm → scan px.
  const fa = 25.4 / artwork.dpi, fs = dpi / 25.4;
  const ox = 0.5 * fa - wMm / 2, oy = 0.5 * fa - hMm / 2;
  const m: Affine = [
    c * fa * fs,
    -sn * fa * fs,
    (c * ox - sn * oy + centre.x) * fs - 0.5,
    sn * fa * fs,
    c * fa * fs,
    (sn * ox + c * oy + centre.y) * fs - 0.5,
  ];
  const width = Math.round(size.w * fs), height = Math.round(size.h * fs);
  const inv = invert(m);

  const distort = o.distortMm;
  const shift = (x: number, y: number): [number, number] => {
    if (!distort) return [0, 0];
    const [dx, dy] = distort((x + 0.5) * fa, (y + 0.5) * fa);
    return [dx / fa, dy / fa];
  };
  const scanPoint = (x: number, y: number): [number, number] => {
    const [dx, dy] = shift(x, y);
    return [m[0] * (x + dx) + m[1] * (y + dy) + m[2], m[3] * (x + dx) + m[4] * (y + dy) + m[5]];
  };
  const n = Math.max(1, Math.ceil(Math.sqrt(Math.abs(inv[0] * inv[4] - inv[1] * inv[3])) - 1e-9));
  const sample = o.resampling === "bicubic" ? bicubic : bilinear;
  const data = new Uint8ClampedArray(width * height * 4);
  const acc = [0, 0, 0];
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      acc[0] = acc[1] = acc[2] = 0;
      for (let j = 0; j < n; j++) {
        for (let i = 0; i < n; i++) {
          const sx = x + (i + 0.5) / n - 0.5, sy = y + (j + 0.5) / n - 0.5;
          let ax = inv[0] * sx + inv[1] * sy + inv[2], ay = inv[3] * sx + inv[4] * sy + inv[5];
          if (distort) {
            // Invert p + d(p) = q by fixed-point iteration (d is small and smooth).
            const qx = ax, qy = ay;
            for (let it = 0; it < 4; it++) {
              const [dx, dy] = shift(ax, ay);
              ax = qx - dx;
              ay = qy - dy;
            }
          }
          if (ax >= -0.5 && ay >= -0.5 && ax <= artwork.width - 0.5 && ay <= artwork.height - 0.5) sample(artwork, ax, ay, acc);
          else for (let k = 0; k < 3; k++) acc[k] += bg[k];
        }
      }
      const p = (y * width + x) * 4;
      for (let k = 0; k < 3; k++) data[p + k] = acc[k] / (n * n) + 0.5;
      data[p + 3] = 255;
    }
  }
  return { scan: { width, height, data, dpi, dpiSource: "caller" }, artworkToScan: m, scanPoint };
}

function bilinear(img: ArtworkRaster, x: number, y: number, acc: number[]) {
  const cx = Math.min(Math.max(x, 0), img.width - 1), cy = Math.min(Math.max(y, 0), img.height - 1);
  const x0 = Math.min(Math.floor(cx), img.width - 2), y0 = Math.min(Math.floor(cy), img.height - 2);
  const fx = cx - x0, fy = cy - y0, d = img.data, w = img.width;
  const p = (y0 * w + x0) * 4, q = p + w * 4;
  for (let k = 0; k < 3; k++) {
    acc[k] += (1 - fy) * ((1 - fx) * d[p + k] + fx * d[p + 4 + k]) + fy * ((1 - fx) * d[q + k] + fx * d[q + 4 + k]);
  }
}

function keys(t: number): number {
  const a = -0.5, u = Math.abs(t);
  if (u <= 1) return (a + 2) * u * u * u - (a + 3) * u * u + 1;
  if (u < 2) return a * u * u * u - 5 * a * u * u + 8 * a * u - 4 * a;
  return 0;
}

function bicubic(img: ArtworkRaster, x: number, y: number, acc: number[]) {
  const x0 = Math.floor(x), y0 = Math.floor(y), fx = x - x0, fy = y - y0, d = img.data, w = img.width;
  const wx = [keys(1 + fx), keys(fx), keys(1 - fx), keys(2 - fx)];
  const wy = [keys(1 + fy), keys(fy), keys(1 - fy), keys(2 - fy)];
  const v = [0, 0, 0];
  for (let j = 0; j < 4; j++) {
    const yy = Math.min(Math.max(y0 - 1 + j, 0), img.height - 1);
    for (let i = 0; i < 4; i++) {
      const xx = Math.min(Math.max(x0 - 1 + i, 0), w - 1), p = (yy * w + xx) * 4, wt = wx[i] * wy[j];
      for (let k = 0; k < 3; k++) v[k] += wt * d[p + k];
    }
  }
  for (let k = 0; k < 3; k++) acc[k] += Math.min(255, Math.max(0, v[k]));
}
