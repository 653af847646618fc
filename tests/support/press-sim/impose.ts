// A press sheet: ups of one template in rows × columns with gutters, a margin, crop marks and a colour bar
// outside the ups, and a TrimBox around the ups (positions in the truth are mm from its top-left).
import { PDFDocument, PDFName, StandardFonts } from "pdf-lib";
import { Painter, type BoxMm, type Ink, type TextEdit, type TextItem } from "./painter";
import { seeded } from "./random";
import type { Template } from "./templates";

export interface SheetLayout {
  rows: number;
  columns: number;
  gutterMm: number;
  marginMm: number;
  /** Extra margin at the bottom for the colour bar. */
  barMm: number;
}

export interface ImposedSheet {
  pdf: Uint8Array;
  widthMm: number;
  heightMm: number;
  /** The trim box in sheet mm (from the sheet's top-left). */
  trim: BoxMm;
  /** Each up's box in sheet mm. */
  ups: BoxMm[];
  texts: TextItem[];
}

const PT = 72 / 25.4;
const REGISTRATION: Ink = [1, 1, 1, 1];
const BAR: Ink[] = [
  [1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1], [0.5, 0, 0, 0], [0, 0.5, 0, 0], [0, 0, 0.5, 0], [0, 0, 0, 0.5],
  [1, 1, 0, 0], [0, 1, 1, 0], [1, 0, 1, 0], [0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25], [0, 0, 0, 0.8],
];

export function sheetSize(t: Template, l: SheetLayout): { widthMm: number; heightMm: number } {
  return {
    widthMm: 2 * l.marginMm + l.columns * t.widthMm + (l.columns - 1) * l.gutterMm,
    heightMm: 2 * l.marginMm + l.barMm + l.rows * t.heightMm + (l.rows - 1) * l.gutterMm,
  };
}

/** Draws the sheet; `edit` changes or leaves out one text item (the second rendering of a changed-text case). */
export async function imposeSheet(t: Template, l: SheetLayout, designSeed: number, edit?: TextEdit): Promise<ImposedSheet> {
  const { widthMm, heightMm } = sheetSize(t, l);
  const doc = await PDFDocument.create();
  // A fixed date keeps the file the same for the same seed.
  doc.setCreationDate(new Date(Date.UTC(2026, 0, 1)));
  doc.setModificationDate(new Date(Date.UTC(2026, 0, 1)));
  doc.setProducer("Tympan press simulator");
  const page = doc.addPage([widthMm * PT, heightMm * PT]);
  const fonts = {
    regular: await doc.embedFont(StandardFonts.Helvetica),
    bold: await doc.embedFont(StandardFonts.HelveticaBold),
    serif: await doc.embedFont(StandardFonts.TimesRoman),
  };
  const p = new Painter(page, heightMm, fonts, edit);
  const trim = { x: l.marginMm, y: l.marginMm, w: widthMm - 2 * l.marginMm, h: heightMm - 2 * l.marginMm - l.barMm };
  const ups: BoxMm[] = [];
  for (let r = 0; r < l.rows; r++) {
    for (let c = 0; c < l.columns; c++) {
      const x = l.marginMm + c * (t.widthMm + l.gutterMm), y = l.marginMm + r * (t.heightMm + l.gutterMm);
      p.startUp(ups.length);
      t.draw(p, x, y, seeded(designSeed));
      ups.push({ x, y, w: t.widthMm, h: t.heightMm });
    }
  }
  cropMarks(p, trim, l);
  colourBar(p, trim, l, heightMm);
  // TrimBox in PDF points, from the page's bottom-left.
  page.node.set(PDFName.of("TrimBox"), doc.context.obj([trim.x * PT, (heightMm - trim.y - trim.h) * PT, (trim.x + trim.w) * PT, (heightMm - trim.y) * PT]));
  return { pdf: await doc.save({ useObjectStreams: false }), widthMm, heightMm, trim, ups, texts: p.texts };
}

function cropMarks(p: Painter, trim: BoxMm, l: SheetLayout): void {
  const len = Math.min(8, l.marginMm - 2), off = 2;
  for (const x of [trim.x, trim.x + trim.w]) {
    p.line(x, trim.y - off, x, trim.y - off - len, REGISTRATION, 0.25);
    p.line(x, trim.y + trim.h + off, x, trim.y + trim.h + off + len, REGISTRATION, 0.25);
  }
  for (const y of [trim.y, trim.y + trim.h]) {
    p.line(trim.x - off, y, trim.x - off - len, y, REGISTRATION, 0.25);
    p.line(trim.x + trim.w + off, y, trim.x + trim.w + off + len, y, REGISTRATION, 0.25);
  }
}

function colourBar(p: Painter, trim: BoxMm, l: SheetLayout, heightMm: number): void {
  const size = Math.min(5, l.barMm - 1);
  const y = heightMm - l.marginMm - l.barMm + (l.barMm - size) / 2 + l.marginMm / 2;
  for (let x = trim.x + 12, i = 0; x + size <= trim.x + trim.w - 12; x += size, i++) p.rect(x, y, size, size, BAR[i % BAR.length]);
}
