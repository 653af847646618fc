// Test artwork: an invented folding-carton press sheet ("Brindlewood Tea Co.", a fictional brand) as a PDF,
// rows × columns of identical ups, plus the layout in millimetres so tests know where every element and
// every planted defect lies. Coordinates: mm from the top-left of the trim box, x right, y down.
import fontkit from "@pdf-lib/fontkit";
import { PDFDocument, StandardFonts, rgb, type PDFFont, type PDFPage, type RGB } from "pdf-lib";
import type { RectMm, UpsLayout } from "@/lib/imaging/types";
import { loadFonts } from "../../lib/reports/document";

/** PDF user space unit is 1/72 inch (ISO 32000-1, 8.3.2.3). */
export const PT_PER_MM = 72 / 25.4;

export interface CartonOptions {
  /** Trim size of the press sheet in mm. */
  widthMm?: number;
  heightMm?: number;
  rows?: number;
  columns?: number;
  /** Space from trim edge to the ups, and between ups. */
  marginMm?: number;
  gutterMm?: number;
  /** Media box extends this far beyond the trim box on every side (slug with crop marks). 0: no TrimBox. */
  slugMm?: number;
  /** Change one word of one up's small print (the "changed word" defect). */
  changedWord?: { up: number; wordIndex?: number; replacement?: string };
  /** Draw the sheet-number box (variable data area, excluded from inspection). Default true. */
  sheetNumberBox?: boolean;
  /** Text printed inside the sheet-number box (the artwork normally leaves it empty). */
  sheetNumber?: string;
  /** Number of identical pages. Default 1. */
  pages?: number;
  /** Embed the type (DejaVu Sans, shipped with the app) as print-ready PDFs do; default false: Helvetica, not embedded. */
  embedFonts?: boolean;
}

export interface UpParts {
  up: RectMm;
  panel: RectMm;
  heading: RectMm;
  rules: RectMm[];
  smallPrint: RectMm;
  colourBar: RectMm;
  colourPatches: { rect: RectMm; rgb: [number, number, number] }[];
  bars: RectMm;
  /** Tinted lower panel with large type and a round seal; null when the up is too short for it. */
  lowerPanel: RectMm | null;
  /** Boxes of the lower panel's large type and of its seal (the circle's bounding box). */
  lowerType: RectMm | null;
  seal: RectMm | null;
  /** Each word of the small print with its box. */
  words: { text: string; rect: RectMm }[];
}

export interface CartonLayout {
  widthMm: number;
  heightMm: number;
  /** Trim box offset inside the media box (= slugMm). */
  trimOffsetMm: { x: number; y: number };
  mediaMm: { w: number; h: number };
  ups: Required<UpsLayout>;
  upParts: UpParts[];
  /** Union of old and new word boxes of the changed word, null when none. */
  changedWordMm: RectMm | null;
  changedWord: { up: number; from: string; to: string } | null;
  /** The sheet-number box: an area to exclude (variable data), null when not drawn. */
  sheetNumberMm: RectMm | null;
  /** Smallest type on the sheet, points. */
  smallPrintPt: number;
}

export const BRAND = "Brindlewood Tea Co.";
export const SMALL_PRINT =
  "Ingredients: black tea (68%), dried apple pieces, hibiscus blossom, rosehip, natural flavouring, " +
  "cinnamon bark (4%), orange peel (3%). Brew one bag in 250 ml of freshly boiled water for 3 to 5 minutes. " +
  "Store in a cool, dry place away from strong odours. Best before: see base of pack. " +
  "Packed for Brindlewood Tea Co., 14 Marrowgate Lane, Fennick Vale. Net weight 40 g (20 bags of 2 g).";
const DEFAULT_CHANGED_INDEX = SMALL_PRINT.split(" ").indexOf("250");

const SMALL_PT = 6;
const HEADING_PT = 14;
const PAD_MM = 3;
const PANEL: RGB = rgb(0.05, 0.42, 0.47);
const INK: RGB = rgb(0.1, 0.1, 0.12);
const TINT: RGB = rgb(0.97, 0.88, 0.7);
const SEAL: RGB = rgb(0.78, 0.16, 0.36);
/** Saturated patches of the colour bar (sRGB 0–255). */
export const PATCHES: [number, number, number][] = [
  [0, 160, 230],
  [230, 0, 125],
  [255, 230, 0],
  [25, 25, 25],
  [220, 30, 40],
  [0, 150, 70],
  [40, 50, 150],
  [245, 130, 30],
];
/** Bar widths (mm) of the bar pattern, alternating bar and space. */
const BAR_WIDTHS = [0.3, 0.3, 0.6, 0.3, 0.9, 0.6, 0.3, 0.9, 1.2, 0.3, 0.6, 0.6, 0.3, 1.5, 0.9, 0.3];

/** Builds the carton sheet PDF and reports its layout. */
export async function makeCartonPdf(opts: CartonOptions = {}): Promise<{ pdf: Uint8Array; layout: CartonLayout }> {
  const {
    widthMm = 297,
    heightMm = 210,
    rows = 2,
    columns = 2,
    marginMm = 12,
    gutterMm = 4,
    slugMm = 5,
    sheetNumberBox = true,
    pages = 1,
    embedFonts = false,
  } = opts;
  const doc = await PDFDocument.create();
  doc.setTitle("Carton sheet (test artwork)");
  doc.setProducer("Tympan test support");
  let font: PDFFont, bold: PDFFont;
  if (embedFonts) {
    doc.registerFontkit(fontkit);
    const [regular, heavy] = await loadFonts();
    font = await doc.embedFont(regular, { subset: true });
    bold = await doc.embedFont(heavy, { subset: true });
  } else {
    font = await doc.embedFont(StandardFonts.Helvetica);
    bold = await doc.embedFont(StandardFonts.HelveticaBold);
  }

  const area: RectMm = { x: marginMm, y: marginMm, w: widthMm - 2 * marginMm, h: heightMm - 2 * marginMm };
  const upW = (area.w - (columns - 1) * gutterMm) / columns;
  const upH = (area.h - (rows - 1) * gutterMm) / rows;
  if (upW < 40 || upH < 40) throw new RangeError(`Ups of ${upW.toFixed(1)} × ${upH.toFixed(1)} mm are too small (40 mm min).`);

  const layout: CartonLayout = {
    widthMm,
    heightMm,
    trimOffsetMm: { x: slugMm, y: slugMm },
    mediaMm: { w: widthMm + 2 * slugMm, h: heightMm + 2 * slugMm },
    ups: { rows, columns, areaMm: area },
    upParts: [],
    changedWordMm: null,
    changedWord: null,
    sheetNumberMm: null,
    smallPrintPt: SMALL_PT,
  };
  const change = opts.changedWord;
  if (change && (change.up < 1 || change.up > rows * columns)) throw new RangeError(`No up ${change.up} on a ${rows}×${columns} sheet.`);

  for (let p = 0; p < pages; p++) {
    const page = doc.addPage([layout.mediaMm.w * PT_PER_MM, layout.mediaMm.h * PT_PER_MM]);
    if (slugMm > 0) {
      page.setTrimBox(slugMm * PT_PER_MM, slugMm * PT_PER_MM, widthMm * PT_PER_MM, heightMm * PT_PER_MM);
      drawCropMarks(page, layout);
    }
    const draw = new MmDrawer(page, layout);
    for (let r = 0; r < rows; r++) {
      for (let c = 0; c < columns; c++) {
        const n = r * columns + c + 1;
        const up = { x: area.x + c * (upW + gutterMm), y: area.y + r * (upH + gutterMm), w: upW, h: upH };
        const changeHere = change && change.up === n ? change : undefined;
        const parts = drawUp(draw, up, font, bold, changeHere, p === 0 ? layout : undefined);
        if (p === 0) layout.upParts.push(parts);
      }
    }
    if (sheetNumberBox) {
      const box = { x: widthMm - marginMm - 40, y: heightMm - marginMm + 2, w: 40, h: Math.min(8, marginMm - 3) };
      draw.strokeRect(box, 0.3, INK);
      draw.text("SHEET", box.x - 10, box.y + box.h - 1.5, font, 6, INK);
      if (opts.sheetNumber) draw.text(opts.sheetNumber, box.x + 2, box.y + box.h - 1.5, bold, 12, INK);
      layout.sheetNumberMm = box;
    }
  }
  return { pdf: await doc.save({ useObjectStreams: false }), layout };
}

function drawUp(
  draw: MmDrawer,
  up: RectMm,
  font: PDFFont,
  bold: PDFFont,
  change: CartonOptions["changedWord"],
  layout: CartonLayout | undefined,
): UpParts {
  const inner = { x: up.x + PAD_MM, w: up.w - 2 * PAD_MM };
  // Thin outline of the up (a die line is common practice on artwork; here simply the up's edge).
  draw.strokeRect(up, 0.25, INK);
  const panel = { x: inner.x, y: up.y + PAD_MM, w: inner.w, h: up.h * 0.28 };
  draw.fillRect(panel, PANEL);
  const headingSize = HEADING_PT / PT_PER_MM;
  const heading = { x: panel.x + 3, y: panel.y + 3, w: bold.widthOfTextAtSize(BRAND, HEADING_PT) / PT_PER_MM, h: headingSize };
  draw.text(BRAND, heading.x, heading.y + headingSize * 0.76, bold, HEADING_PT, rgb(1, 1, 1));
  draw.text("Apple & Hibiscus Infusion", heading.x, heading.y + headingSize + 4, font, 9, rgb(1, 1, 1));

  let y = panel.y + panel.h + 2;
  const rules: RectMm[] = [];
  for (const pt of [0.25, 0.5, 1]) {
    const rule = { x: inner.x, y, w: inner.w, h: pt / PT_PER_MM };
    draw.fillRect(rule, INK);
    rules.push(rule);
    y += 1.2;
  }

  // Small print laid out word by word so the box of every word is known exactly.
  const words = SMALL_PRINT.split(" ");
  const space = font.widthOfTextAtSize(" ", SMALL_PT) / PT_PER_MM;
  const lineMm = (SMALL_PT * 1.25) / PT_PER_MM;
  const ascent = (SMALL_PT * 0.72) / PT_PER_MM;
  const descent = (SMALL_PT * 0.22) / PT_PER_MM;
  const top = y + 1;
  let cx = inner.x;
  let baseline = top + ascent;
  const placed: UpParts["words"] = [];
  const changedIndex = change ? (change.wordIndex ?? DEFAULT_CHANGED_INDEX) : -1;
  if (change && (changedIndex < 0 || changedIndex >= words.length)) throw new RangeError(`No word ${changedIndex} in the small print.`);
  words.forEach((word, i) => {
    const w = font.widthOfTextAtSize(word, SMALL_PT) / PT_PER_MM;
    if (cx + w > inner.x + inner.w && cx > inner.x) {
      cx = inner.x;
      baseline += lineMm;
    }
    const rect = { x: cx, y: baseline - ascent, w, h: ascent + descent };
    let shown = word;
    if (i === changedIndex && change) {
      shown = change.replacement ?? alternativeWord(word);
      const w2 = font.widthOfTextAtSize(shown, SMALL_PT) / PT_PER_MM;
      if (layout) {
        layout.changedWordMm = { ...rect, w: Math.max(w, w2) };
        layout.changedWord = { up: change.up, from: word, to: shown };
      }
    }
    draw.text(shown, cx, baseline, font, SMALL_PT, INK);
    placed.push({ text: word, rect });
    cx += w + space;
  });
  const smallPrint = { x: inner.x, y: top, w: inner.w, h: baseline + descent - top };

  const barsTop = smallPrint.y + smallPrint.h + 3;
  const stripH = 5;
  const patchMm = Math.min(4.5, (inner.w * 0.55) / PATCHES.length);
  const colourPatches = PATCHES.map((c, i) => ({ rect: { x: inner.x + i * patchMm, y: barsTop, w: patchMm, h: stripH }, rgb: c }));
  for (const { rect, rgb: c } of colourPatches) draw.fillRect(rect, rgb(c[0] / 255, c[1] / 255, c[2] / 255));
  const colourBar = { x: inner.x, y: barsTop, w: patchMm * PATCHES.length, h: stripH };
  let bx = colourBar.x + colourBar.w + 3;
  const barsStart = bx;
  BAR_WIDTHS.forEach((w, i) => {
    if (i % 2 === 0) draw.fillRect({ x: bx, y: barsTop, w, h: stripH + 3 }, INK);
    bx += w;
  });
  const bars = { x: barsStart, y: barsTop, w: bx - barsStart, h: stripH + 3 };
  if (barsTop + stripH + 3 > up.y + up.h - 1 || bx > inner.x + inner.w) {
    throw new RangeError(`An up of ${up.w.toFixed(1)} × ${up.h.toFixed(1)} mm cannot hold the carton artwork.`);
  }
  const lowerTop = bars.y + bars.h + 3;
  let lowerPanel: RectMm | null = null;
  let lowerType: RectMm | null = null;
  let seal: RectMm | null = null;
  if (up.y + up.h - PAD_MM - lowerTop >= 12) {
    lowerPanel = { x: inner.x, y: lowerTop, w: inner.w, h: up.y + up.h - PAD_MM - lowerTop };
    draw.fillRect(lowerPanel, TINT);
    const text = "20 TEA BAGS";
    const baseline = lowerPanel.y + Math.min(lowerPanel.h - 2, 10);
    const capMm = (20 * 0.72) / PT_PER_MM;
    draw.text(text, lowerPanel.x + 3, baseline, bold, 20, PANEL);
    lowerType = { x: lowerPanel.x + 3, y: baseline - capMm, w: bold.widthOfTextAtSize(text, 20) / PT_PER_MM, h: capMm };
    const radius = Math.min(lowerPanel.h / 2 - 1.5, 12);
    const cx = lowerPanel.x + lowerPanel.w - radius - 3;
    const cy = lowerPanel.y + lowerPanel.h / 2;
    draw.circle(cx, cy, radius, SEAL);
    seal = { x: cx - radius, y: cy - radius, w: 2 * radius, h: 2 * radius };
  }
  return { up, panel, heading, rules, smallPrint, colourBar, colourPatches, bars, lowerPanel, lowerType, seal, words: placed };
}

/** A visibly different word of similar width: digits step up, letters swap one character. */
function alternativeWord(word: string): string {
  if (/^\d+$/.test(word)) return String((Number(word[0]) % 9) + 1) + word.slice(1);
  const i = word.search(/[a-z]/i);
  if (i < 0) return word + "x";
  const swapped = word[i].toLowerCase() === "o" ? "a" : "o";
  return word.slice(0, i) + swapped + word.slice(i + 1);
}

function drawCropMarks(page: PDFPage, layout: CartonLayout): void {
  const d = new MmDrawer(page, layout);
  const s = layout.trimOffsetMm.x;
  for (const [x, y] of [
    [0, 0],
    [layout.widthMm, 0],
    [0, layout.heightMm],
    [layout.widthMm, layout.heightMm],
  ]) {
    const dx = x === 0 ? -1 : 1;
    const dy = y === 0 ? -1 : 1;
    d.line(x + dx * 1, y, x + dx * s, y, 0.25);
    d.line(x, y + dy * 1, x, y + dy * s, 0.25);
  }
}

/** Draws in trim-box millimetres, y down, onto a pdf-lib page (PDF space: points, y up, media box origin). */
class MmDrawer {
  constructor(
    private readonly page: PDFPage,
    private readonly layout: CartonLayout,
  ) {}
  private px(x: number): number {
    return (this.layout.trimOffsetMm.x + x) * PT_PER_MM;
  }
  private py(y: number): number {
    return (this.layout.mediaMm.h - this.layout.trimOffsetMm.y - y) * PT_PER_MM;
  }
  fillRect(r: RectMm, color: RGB): void {
    this.page.drawRectangle({ x: this.px(r.x), y: this.py(r.y + r.h), width: r.w * PT_PER_MM, height: r.h * PT_PER_MM, color });
  }
  strokeRect(r: RectMm, thicknessPt: number, color: RGB): void {
    this.page.drawRectangle({
      x: this.px(r.x),
      y: this.py(r.y + r.h),
      width: r.w * PT_PER_MM,
      height: r.h * PT_PER_MM,
      borderColor: color,
      borderWidth: thicknessPt,
    });
  }
  circle(cx: number, cy: number, radius: number, color: RGB): void {
    const r = radius * PT_PER_MM;
    this.page.drawEllipse({ x: this.px(cx), y: this.py(cy), xScale: r, yScale: r, color });
  }
  line(x1: number, y1: number, x2: number, y2: number, thicknessPt: number): void {
    this.page.drawLine({ start: { x: this.px(x1), y: this.py(y1) }, end: { x: this.px(x2), y: this.py(y2) }, thickness: thicknessPt, color: rgb(0, 0, 0) });
  }
  text(s: string, x: number, baseline: number, font: PDFFont, sizePt: number, color: RGB): void {
    this.page.drawText(s, { x: this.px(x), y: this.py(baseline), size: sizePt, font, color });
  }
}
