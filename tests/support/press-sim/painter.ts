// Drawing on a pdf-lib page in millimetres from the sheet's top-left, in process colours (CMYK 0–1). Every piece
// of text is recorded with its box, so a second rendering can change or leave out one of them and the truth can
// say where.
import { cmyk, degrees, type PDFFont, type PDFPage } from "pdf-lib";

export type Ink = readonly [c: number, m: number, y: number, k: number];
export interface BoxMm { x: number; y: number; w: number; h: number }
export interface TextItem { up: number; index: number; text: string; box: BoxMm }
/** What the second rendering does differently: one text item of one up changed or left out. */
export interface TextEdit { up: number; index: number; action: "change" | "omit"; to?: string }

const PT = 72 / 25.4;

export class Painter {
  readonly texts: TextItem[] = [];
  private textIndex = 0;
  up = 0;

  constructor(
    private readonly page: PDFPage,
    private readonly sheetHeightMm: number,
    readonly fonts: { regular: PDFFont; bold: PDFFont; serif: PDFFont },
    private readonly edit?: TextEdit,
  ) {}

  startUp(up: number): void {
    this.up = up;
    this.textIndex = 0;
  }

  rect(x: number, y: number, w: number, h: number, ink: Ink): void {
    this.page.drawRectangle({ x: x * PT, y: (this.sheetHeightMm - y - h) * PT, width: w * PT, height: h * PT, color: cmyk(...ink) });
  }

  frame(x: number, y: number, w: number, h: number, ink: Ink, widthPt: number): void {
    this.page.drawRectangle({ x: x * PT, y: (this.sheetHeightMm - y - h) * PT, width: w * PT, height: h * PT, borderColor: cmyk(...ink), borderWidth: widthPt });
  }

  line(x1: number, y1: number, x2: number, y2: number, ink: Ink, widthPt: number): void {
    this.page.drawLine({
      start: { x: x1 * PT, y: (this.sheetHeightMm - y1) * PT },
      end: { x: x2 * PT, y: (this.sheetHeightMm - y2) * PT },
      thickness: widthPt,
      color: cmyk(...ink),
    });
  }

  circle(cx: number, cy: number, r: number, ink: Ink): void {
    this.page.drawEllipse({ x: cx * PT, y: (this.sheetHeightMm - cy) * PT, xScale: r * PT, yScale: r * PT, color: cmyk(...ink) });
  }

  /** Text with its baseline at y (mm), size in pt; returns the width in mm. */
  text(text: string, x: number, y: number, sizePt: number, ink: Ink, font: PDFFont = this.fonts.regular, rotate = 0): number {
    const index = this.textIndex++;
    const width = font.widthOfTextAtSize(text, sizePt) / PT;
    const sizeMm = sizePt / PT;
    const box = rotate === 0
      ? { x, y: y - 0.78 * sizeMm, w: width, h: 1.02 * sizeMm }
      : { x: x - 0.78 * sizeMm, y: y - width, w: 1.02 * sizeMm, h: width };
    this.texts.push({ up: this.up, index, text, box });
    let shown = text;
    if (this.edit && this.edit.up === this.up && this.edit.index === index) {
      if (this.edit.action === "omit") return width;
      shown = this.edit.to ?? text;
    }
    this.page.drawText(shown, { x: x * PT, y: (this.sheetHeightMm - y) * PT, size: sizePt, font, color: cmyk(...ink), rotate: degrees(rotate) });
    return width;
  }
}
