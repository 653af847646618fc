import { PDFDocument, PDFHexString, PDFName, PDFNumber, rgb } from "pdf-lib";
import { describe, expect, it } from "vitest";
import { artworkAtDpi, averageDown, rasterisePage, readPdfPages } from "@/lib/imaging/rasterise/rasterise";
import { ImagingError, type RgbaImage } from "@/lib/imaging/types";
import { makeCartonPdf, PT_PER_MM } from "../support/carton";

// ISO 216: A4 is 210 × 297 mm. ISO 32000-1, 8.3.2.3: the default user space unit is 1/72 inch.
const A4_PT: [number, number] = [210 * PT_PER_MM, 297 * PT_PER_MM];

/** Bounding box (px) of the pixels darker than mid-grey. */
function inkBox(img: RgbaImage): { x0: number; y0: number; x1: number; y1: number } {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let y = 0; y < img.height; y++) {
    for (let x = 0; x < img.width; x++) {
      if (img.data[(y * img.width + x) * 4] < 128) {
        x0 = Math.min(x0, x); y0 = Math.min(y0, y); x1 = Math.max(x1, x + 1); y1 = Math.max(y1, y + 1);
      }
    }
  }
  return { x0, y0, x1, y1 };
}

/** A page with a black rectangle at (xMm, yMm) from the top-left of the trim box, size wMm × hMm. */
async function pageWithRectangle(opts: { trimOffsetMm?: [number, number]; cropBox?: boolean; rotate?: number } = {}) {
  const doc = await PDFDocument.create();
  const [ox, oy] = opts.trimOffsetMm ?? [0, 0];
  const media: [number, number] = [(210 + 2 * ox) * PT_PER_MM, (297 + 2 * oy) * PT_PER_MM];
  const page = doc.addPage(media);
  if (ox || oy) page.setTrimBox(ox * PT_PER_MM, oy * PT_PER_MM, A4_PT[0], A4_PT[1]);
  if (opts.cropBox) page.setCropBox((ox / 2) * PT_PER_MM, (oy / 2) * PT_PER_MM, media[0] - ox * PT_PER_MM, media[1] - oy * PT_PER_MM);
  if (opts.rotate) page.node.set(PDFName.of("Rotate"), PDFNumber.of(opts.rotate));
  const rect = { x: 40, y: 55, w: 30, h: 12 };
  page.drawRectangle({
    x: (ox + rect.x) * PT_PER_MM,
    y: media[1] - (oy + rect.y + rect.h) * PT_PER_MM,
    width: rect.w * PT_PER_MM,
    height: rect.h * PT_PER_MM,
    color: rgb(0, 0, 0),
  });
  return { pdf: await doc.save(), rect };
}

async function expectImagingError(p: Promise<unknown>, code: string): Promise<ImagingError> {
  const err = await p.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(ImagingError);
  expect((err as ImagingError).code).toBe(code);
  expect((err as ImagingError).message.length).toBeGreaterThan(10);
  return err as ImagingError;
}

describe("rasterisePage", () => {
  it("renders A4 at 300 dpi as 2480 × 3508 px (ISO 216 size, 1/72 inch PDF unit per ISO 32000-1)", async () => {
    const { pdf } = await pageWithRectangle();
    const r = await rasterisePage(pdf, { dpi: 300 });
    expect(Math.abs(r.width - 2480)).toBeLessThanOrEqual(1);
    expect(Math.abs(r.height - 3508)).toBeLessThanOrEqual(1);
    expect(r.data.length).toBe(r.width * r.height * 4);
    expect(r.widthMm).toBeCloseTo(210, 6);
    expect(r.heightMm).toBeCloseTo(297, 6);
    expect(r.box).toBe("MediaBox");
    expect(r.pageCount).toBe(1);
  });

  it.each<[string, { trimOffsetMm?: [number, number]; cropBox?: boolean }]>([
    ["no trim box", {}],
    ["a trim box offset 12 × 9 mm inside the media box", { trimOffsetMm: [12, 9] }],
    ["a crop box different from media and trim box", { trimOffsetMm: [12, 9], cropBox: true }],
  ])("places a rectangle within 1 px of px = mm × dpi / 25.4 with %s", async (_label, opts) => {
    const { pdf, rect } = await pageWithRectangle(opts);
    const dpi = 150;
    const r = await rasterisePage(pdf, { dpi });
    expect(r.box).toBe(opts.trimOffsetMm ? "TrimBox" : "MediaBox");
    expect(r.widthMm).toBeCloseTo(210, 6);
    const box = inkBox(r);
    const k = dpi / 25.4;
    expect(Math.abs(box.x0 - rect.x * k)).toBeLessThanOrEqual(1);
    expect(Math.abs(box.y0 - rect.y * k)).toBeLessThanOrEqual(1);
    expect(Math.abs(box.x1 - (rect.x + rect.w) * k)).toBeLessThanOrEqual(1);
    expect(Math.abs(box.y1 - (rect.y + rect.h) * k)).toBeLessThanOrEqual(1);
  });

  it("honours /Rotate 90: the page turns clockwise and the trim box still lands at the origin", async () => {
    const { pdf, rect } = await pageWithRectangle({ trimOffsetMm: [12, 9], rotate: 90 });
    const dpi = 100;
    const r = await rasterisePage(pdf, { dpi });
    expect(r.widthMm).toBeCloseTo(297, 6);
    expect(r.heightMm).toBeCloseTo(210, 6);
    const k = dpi / 25.4;
    // Turned clockwise (ISO 32000-1, 7.7.3.3): the page's left edge becomes the top and its bottom the left.
    const box = inkBox(r);
    expect(Math.abs(box.x0 - (297 - rect.y - rect.h) * k)).toBeLessThanOrEqual(1);
    expect(Math.abs(box.y0 - rect.x * k)).toBeLessThanOrEqual(1);
    expect(Math.abs(box.x1 - (297 - rect.y) * k)).toBeLessThanOrEqual(1);
    expect(Math.abs(box.y1 - (rect.x + rect.w) * k)).toBeLessThanOrEqual(1);
  });

  it("paints a white background and keeps the carton's colour patches where its layout says", async () => {
    const { pdf, layout } = await makeCartonPdf();
    const dpi = 100;
    const r = await rasterisePage(pdf, { dpi });
    expect(r.box).toBe("TrimBox");
    const k = dpi / 25.4;
    const at = (xMm: number, yMm: number) => {
      const i = (Math.floor(yMm * k) * r.width + Math.floor(xMm * k)) * 4;
      return [r.data[i], r.data[i + 1], r.data[i + 2], r.data[i + 3]];
    };
    expect(at(2, 2)).toEqual([255, 255, 255, 255]);
    for (const { rect, rgb: c } of layout.upParts[3].colourPatches) {
      const px = at(rect.x + rect.w / 2, rect.y + rect.h / 2);
      for (let ch = 0; ch < 3; ch++) expect(Math.abs(px[ch] - c[ch])).toBeLessThanOrEqual(2);
    }
  });

  it("renders 6 pt small print with the standard font data (ink inside the small-print box only)", async () => {
    const { pdf, layout } = await makeCartonPdf({ rows: 1, columns: 1, widthMm: 120, heightMm: 100 });
    const dpi = 200;
    const r = await rasterisePage(pdf, { dpi });
    const k = dpi / 25.4;
    const sp = layout.upParts[0].smallPrint;
    let inside = 0;
    for (let y = Math.floor(sp.y * k); y < (sp.y + sp.h) * k; y++) {
      for (let x = Math.floor(sp.x * k); x < (sp.x + sp.w) * k; x++) if (r.data[(y * r.width + x) * 4] < 128) inside++;
    }
    const area = sp.w * sp.h * k * k;
    // Text covers roughly a tenth of its line boxes (common practice, no published source): a broad band.
    expect(inside / area).toBeGreaterThan(0.04);
    expect(inside / area).toBeLessThan(0.3);
  });
});

describe("artworkAtDpi", () => {
  it("reduces a 300 dpi raster to the grid and tones rasterisePage gives at 150 dpi, and leaves it alone at 300", async () => {
    const { pdf } = await makeCartonPdf({ widthMm: 150, heightMm: 110, rows: 1, columns: 2 });
    const fine = await rasterisePage(pdf, { dpi: 300 });
    const direct = await rasterisePage(pdf, { dpi: 150 });
    const reduced = await artworkAtDpi(fine, 150);
    expect([reduced.width, reduced.height, reduced.dpi]).toEqual([direct.width, direct.height, 150]);
    let sum = 0;
    for (let i = 0; i < direct.data.length; i += 4) sum += Math.abs(direct.data[i + 1] - reduced.data[i + 1]);
    // Mean green difference under 3 of 255 codes: the two differ only in how edges are anti-aliased.
    expect(sum / (direct.data.length / 4)).toBeLessThan(3);
    expect(await artworkAtDpi(fine, 300)).toBe(fine);
    expect(await artworkAtDpi(fine, 290)).toBe(fine);
  });
});

describe("readPdfPages", () => {
  it("gives page count and sizes in mm without rendering", async () => {
    const { pdf } = await makeCartonPdf({ pages: 3, widthMm: 320, heightMm: 240 });
    const info = await readPdfPages(pdf);
    expect(info.pageCount).toBe(3);
    expect(info.pages[2]).toMatchObject({ page: 3, box: "TrimBox" });
    expect(info.pages[2].widthMm).toBeCloseTo(320, 6);
    expect(info.pages[2].heightMm).toBeCloseTo(240, 6);
  });
});

describe("bad input", () => {
  it("refuses a file that is not a PDF, and an empty one", async () => {
    await expectImagingError(rasterisePage(new Uint8Array([0x89, 0x50, 0x4e, 0x47, 13, 10, 26, 10])), "not_a_pdf");
    await expectImagingError(rasterisePage(new Uint8Array()), "not_a_pdf");
    await expectImagingError(readPdfPages(new TextEncoder().encode("hello, this is plain text")), "not_a_pdf");
  });

  it("refuses a truncated PDF", async () => {
    const { pdf } = await makeCartonPdf();
    await expectImagingError(rasterisePage(pdf.subarray(0, Math.floor(pdf.length / 2))), "pdf_truncated");
  });

  it("refuses a PDF with a valid frame but garbage inside", async () => {
    const junk = new TextEncoder().encode("%PDF-1.7\n" + "x".repeat(500) + "\n%%EOF\n");
    await expectImagingError(rasterisePage(junk), "pdf_unreadable");
  });

  it("refuses a PDF that needs a password (standard security handler, ISO 32000-1, 7.6.3)", async () => {
    const doc = await PDFDocument.create();
    doc.addPage(A4_PT);
    const ctx = doc.context;
    ctx.trailerInfo.Encrypt = ctx.obj({
      Filter: "Standard",
      V: 1,
      R: 2,
      O: PDFHexString.of("11".repeat(32)),
      U: PDFHexString.of("22".repeat(32)),
      P: -4,
    });
    ctx.trailerInfo.ID = ctx.obj([PDFHexString.of("ab".repeat(16)), PDFHexString.of("ab".repeat(16))]);
    const pdf = await doc.save({ useObjectStreams: false });
    await expectImagingError(rasterisePage(pdf), "pdf_encrypted");
  });

  it("refuses a page out of range, naming the page count", async () => {
    const { pdf } = await makeCartonPdf({ pages: 2 });
    const err = await expectImagingError(rasterisePage(pdf, { page: 3 }), "page_out_of_range");
    expect(err.message).toMatch(/2 pages/);
    await expectImagingError(rasterisePage(pdf, { page: 0 }), "page_out_of_range");
  });

  it("refuses a resolution outside 72–600 dpi and a render above the megapixel limit", async () => {
    const { pdf } = await pageWithRectangle();
    await expectImagingError(rasterisePage(pdf, { dpi: 50 }), "dpi_out_of_range");
    await expectImagingError(rasterisePage(pdf, { dpi: 1200 }), "dpi_out_of_range");
    await expectImagingError(rasterisePage(pdf, { dpi: 300, maxMegapixels: 5 }), "render_too_large");
  });

  it("leaves the caller's buffer intact", async () => {
    const { pdf } = await pageWithRectangle();
    const copy = pdf.slice();
    await rasterisePage(pdf, { dpi: 72 });
    expect(pdf.byteLength).toBe(copy.byteLength);
    expect(Buffer.compare(Buffer.from(pdf), Buffer.from(copy))).toBe(0);
  });

  it("prints two shapes that meet without a light seam between them, and averages blocks exactly", async () => {
    // Two black rectangles meeting at x = 50.13 mm, a fraction of a pixel at 100 dpi. Painted one over the other
    // with coverage α each, "over" compositing (Porter & Duff, Compositing Digital Images, 1984) leaves the
    // white showing through by (1 − α)·α′ at the shared edge: up to a quarter of the contrast at α = ½.
    const doc = await PDFDocument.create();
    const page = doc.addPage(A4_PT);
    const split = 50.13, top = 100, h = 20;
    for (const [x, w] of [[30, split - 30], [split, 30]]) {
      page.drawRectangle({ x: x * PT_PER_MM, y: A4_PT[1] - (top + h) * PT_PER_MM, width: w * PT_PER_MM, height: h * PT_PER_MM, color: rgb(0, 0, 0) });
    }
    const pdf = await doc.save();
    const seamPeak = (img: RgbaImage & { dpi: number }) => {
      const y = Math.round(((top + h / 2) * img.dpi) / 25.4), x = Math.floor((split * img.dpi) / 25.4);
      return Math.max(...[-1, 0, 1].map((dx) => img.data[(y * img.width + x + dx) * 4]));
    };
    const plain = await rasterisePage(pdf, { dpi: 100, supersample: 1 });
    const supersampled = await rasterisePage(pdf, { dpi: 100 });
    expect(seamPeak(plain)).toBeGreaterThan(20); // pdf.js's own seam, for the record
    expect(seamPeak(supersampled)).toBeLessThan(seamPeak(plain) / 2);
    expect(supersampled.width).toBe(plain.width);
    // Block means by hand: a 2 × 2 block of 0, 10, 20, 31 averages to 15.25 → 15.
    const src = new Uint8Array(4 * 4);
    [0, 10, 20, 31].forEach((v, i) => src.fill(v, i * 4, i * 4 + 4));
    expect([...averageDown(src, 1, 1, 2)]).toEqual([15, 15, 15, 15]);
  });
});
