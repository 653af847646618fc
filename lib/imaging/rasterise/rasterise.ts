// Artwork PDF page → 8-bit RGBA at a chosen resolution, cut to the trim box (media box when there is none),
// so that pixel (0, 0) is the top-left of the trim box and px = mm × dpi / 25.4.
//
// pdf.js renders (pdfjs-dist legacy build onto @napi-rs/canvas); its page viewport is the crop box, and it
// does not report the trim box, so page boxes are read with pdf-lib. Nothing is fetched: fonts, CMaps and
// wasm decoders come from the installed pdfjs-dist package, and eval is off.
import { createRequire } from "node:module";
import path from "node:path";
import { PDFArray, PDFDocument, PDFName, PDFNumber } from "pdf-lib";
import type { PDFDocumentProxy } from "pdfjs-dist/types/src/display/api";
import sharp from "sharp";
import { ImagingError, type ArtworkRaster } from "../types";

export const MIN_DPI = 72;
export const MAX_DPI = 600;
/** Largest render allowed by default: a B1 sheet (1000 × 707 mm) at 300 dpi is 98.6 megapixels. */
export const DEFAULT_MAX_MEGAPIXELS = 125;
const MM_PER_PT = 25.4 / 72; // PDF user space unit is 1/72 inch (ISO 32000-1, 8.3.2.3)

export interface PdfPageSize {
  /** 1-based page number. */
  page: number;
  /** Size of the page area (trim box, else media box) in mm, after the page's /Rotate. */
  widthMm: number;
  heightMm: number;
  box: "TrimBox" | "MediaBox";
}

export interface RasteriseOptions {
  /** 1-based page number; default 1. */
  page?: number;
  /** Resolution in dots per inch; default 300, 72–600. */
  dpi?: number;
  /** Refuse renders above this many megapixels (memory bound). */
  maxMegapixels?: number;
  /** Render at this whole multiple of `dpi` and average down (default: supersampleFactor). */
  supersample?: number;
}

/**
 * Resolution the artwork is rendered at, at least, before it is averaged down to a lower comparison resolution.
 * A press's RIP images at 2400 dpi or more (common practice, no published source), so two shapes that meet
 * print with no gap; pdf.js anti-aliases each shape on its own, and where two meet at a fraction of a pixel
 * the background shows through both edges (a light seam of up to a quarter of the contrast). At 100 dpi that
 * seam is a quarter of a millimetre wide and was flagged in every up of multi-up sheets on the second simulator;
 * rendered at 300 dpi and averaged, it falls to a third.
 */
const SUPERSAMPLE_DPI = 300;

/** The whole factor a page at `dpi` is rendered at: enough to reach SUPERSAMPLE_DPI, within the megapixel bound. */
export function supersampleFactor(dpi: number, megapixels: number, maxMegapixels = DEFAULT_MAX_MEGAPIXELS): number {
  let k = Math.max(1, Math.floor(SUPERSAMPLE_DPI / dpi));
  while (k > 1 && megapixels * k * k > maxMegapixels) k--;
  return k;
}

export interface RasterisedPage extends ArtworkRaster {
  page: number;
  pageCount: number;
}

const pdfjsDir = path.dirname(createRequire(import.meta.url).resolve("pdfjs-dist/package.json"));
const assetDirs = {
  standardFontDataUrl: path.join(pdfjsDir, "standard_fonts") + path.sep,
  cMapUrl: path.join(pdfjsDir, "cmaps") + path.sep,
  wasmUrl: path.join(pdfjsDir, "wasm") + path.sep,
};

type Box = { x0: number; y0: number; x1: number; y1: number };
interface OpenedPdf {
  doc: PDFDocumentProxy;
  boxes: { box: Box; name: "TrimBox" | "MediaBox"; userUnit: number }[];
}

/** Page count and page sizes in mm, without rendering. */
export async function readPdfPages(bytes: Uint8Array): Promise<{ pageCount: number; pages: PdfPageSize[] }> {
  const opened = await openPdf(bytes);
  try {
    const pages: PdfPageSize[] = [];
    for (let n = 1; n <= opened.doc.numPages; n++) {
      const page = await opened.doc.getPage(n);
      const { box, name, userUnit } = opened.boxes[n - 1];
      const [w, h] = sizeMm(box, userUnit, page.rotate);
      pages.push({ page: n, widthMm: w, heightMm: h, box: name });
    }
    return { pageCount: opened.doc.numPages, pages };
  } finally {
    await opened.doc.destroy();
  }
}

/** Renders one page onto a white background; pixel (0, 0) is the top-left corner of the trim box. */
export async function rasterisePage(bytes: Uint8Array, opts: RasteriseOptions = {}): Promise<RasterisedPage> {
  const { page: pageNumber = 1, dpi = 300, maxMegapixels = DEFAULT_MAX_MEGAPIXELS } = opts;
  if (!Number.isFinite(dpi) || dpi < MIN_DPI || dpi > MAX_DPI) {
    throw new ImagingError("dpi_out_of_range", `Resolution must be between ${MIN_DPI} and ${MAX_DPI} dpi. Got ${dpi}.`);
  }
  const opened = await openPdf(bytes);
  const { doc } = opened;
  try {
    if (!Number.isInteger(pageNumber) || pageNumber < 1 || pageNumber > doc.numPages) {
      throw new ImagingError(
        "page_out_of_range",
        `The artwork has ${doc.numPages} page${doc.numPages === 1 ? "" : "s"}; page ${pageNumber} does not exist.`,
      );
    }
    const page = await doc.getPage(pageNumber);
    const { box, name, userUnit } = opened.boxes[pageNumber - 1];
    const [widthMm, heightMm] = sizeMm(box, userUnit, page.rotate);
    const width = Math.round((widthMm * dpi) / 25.4);
    const height = Math.round((heightMm * dpi) / 25.4);
    if ((width * height) / 1e6 > maxMegapixels) {
      throw new ImagingError(
        "render_too_large",
        `A ${widthMm.toFixed(0)} × ${heightMm.toFixed(0)} mm page at ${dpi} dpi is ${((width * height) / 1e6).toFixed(1)} megapixels, ` +
          `above the limit of ${maxMegapixels}. Choose a lower resolution.`,
      );
    }
    if (width < 1 || height < 1) throw new ImagingError("pdf_unreadable", `Page ${pageNumber} has an empty page area.`);
    const k = opts.supersample ?? supersampleFactor(dpi, (width * height) / 1e6, maxMegapixels);

    // pdf.js maps the crop box onto the viewport; shift it so the trim box's corner lands at the origin.
    // Scale = dpi·k/72 device px per PDF unit (pdf.js multiplies in the page's UserUnit itself).
    const scale = (dpi * k) / 72;
    const base = page.getViewport({ scale });
    const corners = [
      base.convertToViewportPoint(box.x0, box.y0),
      base.convertToViewportPoint(box.x1, box.y1),
      base.convertToViewportPoint(box.x0, box.y1),
      base.convertToViewportPoint(box.x1, box.y0),
    ];
    const left = Math.min(...corners.map((c) => c[0]));
    const top = Math.min(...corners.map((c) => c[1]));
    const viewport = page.getViewport({ scale, offsetX: -left, offsetY: -top });
    const factory = (doc as unknown as { canvasFactory: CanvasFactory }).canvasFactory;
    const target = factory.create(width * k, height * k);
    try {
      await page.render({
        canvas: target.canvas as unknown as HTMLCanvasElement,
        canvasContext: target.context as unknown as CanvasRenderingContext2D,
        viewport,
        intent: "print",
        background: "rgb(255,255,255)",
      }).promise;
      const image = target.context.getImageData(0, 0, width * k, height * k);
      const rendered = new Uint8Array(image.data.buffer, image.data.byteOffset, image.data.byteLength);
      const data = k === 1 ? rendered : averageDown(rendered, width, height, k);
      return { width, height, data, dpi, widthMm, heightMm, box: name, page: pageNumber, pageCount: doc.numPages };
    } finally {
      factory.destroy(target);
    }
  } finally {
    await doc.destroy();
  }
}

/** Each k × k block of an RGBA image (width·k × height·k) averaged into one pixel, rounded. */
export function averageDown(src: Uint8Array, width: number, height: number, k: number): Uint8Array {
  const out = new Uint8Array(width * height * 4);
  const rowSums = new Uint32Array(width * 4);
  const srcStride = width * k * 4, half = (k * k) >> 1;
  for (let y = 0; y < height; y++) {
    rowSums.fill(0);
    for (let dy = 0; dy < k; dy++) {
      let i = (y * k + dy) * srcStride;
      for (let x = 0; x < width; x++) {
        const o = x * 4;
        for (let dx = 0; dx < k; dx++, i += 4) {
          rowSums[o] += src[i]; rowSums[o + 1] += src[i + 1]; rowSums[o + 2] += src[i + 2]; rowSums[o + 3] += src[i + 3];
        }
      }
    }
    const n = k * k, base = y * width * 4;
    for (let j = 0; j < width * 4; j++) out[base + j] = ((rowSums[j] + half) / n) | 0;
  }
  return out;
}

interface CanvasAndContext {
  canvas: unknown;
  context: { getImageData(x: number, y: number, w: number, h: number): { data: Uint8ClampedArray } };
}
interface CanvasFactory {
  create(width: number, height: number): CanvasAndContext;
  destroy(target: CanvasAndContext): void;
}

function sizeMm(box: Box, userUnit: number, rotate: number): [number, number] {
  const w = (box.x1 - box.x0) * userUnit * MM_PER_PT;
  const h = (box.y1 - box.y0) * userUnit * MM_PER_PT;
  return rotate % 180 === 0 ? [w, h] : [h, w];
}

async function openPdf(bytes: Uint8Array): Promise<OpenedPdf> {
  if (!(bytes instanceof Uint8Array) || bytes.length === 0) throw new ImagingError("not_a_pdf", "The artwork file is empty.");
  // ISO 32000-1, 7.5.2: the file starts with %PDF-; readers accept it within the first 1024 bytes.
  const head = Buffer.from(bytes.subarray(0, 1024)).toString("latin1");
  if (!head.includes("%PDF-")) throw new ImagingError("not_a_pdf", "The artwork file is not a PDF (no %PDF- header).");
  // ISO 32000-1, 7.5.5: the last line is %%EOF; without it the file was cut short (an interrupted upload).
  const tail = Buffer.from(bytes.subarray(Math.max(0, bytes.length - 2048))).toString("latin1");
  if (!tail.includes("%%EOF")) {
    throw new ImagingError("pdf_truncated", "The artwork PDF is incomplete (no end-of-file marker): upload it again.");
  }

  const pdfjs = await import("pdfjs-dist/legacy/build/pdf.mjs");
  let doc: PDFDocumentProxy;
  try {
    // pdf.js takes ownership of (and may detach) the buffer it is given: hand it a copy.
    doc = await pdfjs.getDocument({
      data: new Uint8Array(bytes),
      ...assetDirs,
      isEvalSupported: false,
      disableFontFace: true,
      useSystemFonts: false,
      stopAtErrors: false,
      verbosity: 0,
    }).promise;
  } catch (err) {
    const name = (err as { name?: string }).name;
    if (name === "PasswordException") {
      throw new ImagingError("pdf_encrypted", "The artwork PDF is protected by a password. Upload an unprotected PDF.");
    }
    throw new ImagingError("pdf_unreadable", `The artwork PDF cannot be read: ${(err as Error).message}`);
  }
  try {
    return { doc, boxes: await readBoxes(bytes, doc.numPages) };
  } catch (err) {
    await doc.destroy();
    throw err;
  }
}

/** Trim box (else media box) of every page from the page dictionaries. */
async function readBoxes(bytes: Uint8Array, pageCount: number): Promise<OpenedPdf["boxes"]> {
  let lib: PDFDocument;
  try {
    lib = await PDFDocument.load(bytes, { ignoreEncryption: true, updateMetadata: false, throwOnInvalidObject: false });
  } catch (err) {
    throw new ImagingError("pdf_unreadable", `The artwork PDF's page structure cannot be read: ${(err as Error).message}`);
  }
  const pages = lib.getPages();
  if (pages.length !== pageCount) {
    throw new ImagingError("pdf_unreadable", "The artwork PDF's page tree is inconsistent; re-export the PDF.");
  }
  return pages.map((p, i) => {
    const trim = toBox(p.node.TrimBox());
    const media = toBox(p.node.MediaBox());
    if (!media) throw new ImagingError("pdf_unreadable", `Page ${i + 1} of the artwork PDF has no valid MediaBox.`);
    const unit = p.node.lookupMaybe(PDFName.of("UserUnit"), PDFNumber)?.asNumber() ?? 1;
    return trim ? { box: trim, name: "TrimBox" as const, userUnit: unit } : { box: media, name: "MediaBox" as const, userUnit: unit };
  });
}

function toBox(array: PDFArray | undefined): Box | null {
  if (!array || array.size() !== 4) return null;
  const v = array.asArray().map((o) => (o instanceof PDFNumber ? o.asNumber() : NaN));
  if (v.some((n) => !Number.isFinite(n))) return null;
  const box = { x0: Math.min(v[0], v[2]), y0: Math.min(v[1], v[3]), x1: Math.max(v[0], v[2]), y1: Math.max(v[1], v[3]) };
  return box.x1 > box.x0 && box.y1 > box.y0 ? box : null;
}

/**
 * A scan coarser than the approved raster is compared at its own resolution: artwork finer than the scan shows
 * only what the scan cannot, and a scan stretched up to the artwork's grid blurs every edge past what the
 * comparison forgives (a 150 dpi scan against a 300 dpi raster gave strips and whole ups of false findings).
 * The raster is reduced by libvips (sharp) to the same pixel grid rasterisePage would give at `dpi`. Returns
 * the artwork itself when `dpi` is not at least a tenth lower.
 */
export async function artworkAtDpi(artwork: ArtworkRaster, dpi: number): Promise<ArtworkRaster> {
  if (!(dpi < artwork.dpi * 0.9) || dpi < MIN_DPI) return artwork;
  const width = Math.round((artwork.widthMm * dpi) / 25.4);
  const height = Math.round((artwork.heightMm * dpi) / 25.4);
  const { data } = await sharp(artwork.data, { raw: { width: artwork.width, height: artwork.height, channels: 4 } })
    .resize(width, height, { fit: "fill", kernel: "lanczos3" })
    .raw()
    .toBuffer({ resolveWithObject: true });
  return { ...artwork, width, height, dpi, data: new Uint8Array(data.buffer, data.byteOffset, data.length) };
}
