// A small page-layout helper over pdf-lib for Tympan's reports: A4 pages with a running head and foot, text that
// wraps and flows onto new pages, key–value blocks, tables and images. Fonts are DejaVu Sans (shipped with the app
// through the npm package dejavu-fonts-ttf, Bitstream Vera licence), embedded through @pdf-lib/fontkit so the text
// is real, searchable text with every character of the names and comments (ΔE00, accents, quotes).
import { readFile } from "node:fs/promises";
import path from "node:path";
import fontkit from "@pdf-lib/fontkit";
import { PDFDocument, rgb, type PDFFont, type PDFImage, type PDFPage, type RGB } from "pdf-lib";

const FONT_DIR = path.join(process.cwd(), "node_modules", "dejavu-fonts-ttf", "ttf");
let fontBytes: Promise<[Buffer, Buffer]> | null = null;
/** DejaVu Sans regular and bold as shipped with the app, read once. */
export const loadFonts = () => (fontBytes ??= Promise.all([readFile(path.join(FONT_DIR, "DejaVuSans.ttf")), readFile(path.join(FONT_DIR, "DejaVuSans-Bold.ttf"))]));

export const A4 = { width: 595.28, height: 841.89 };
export const MARGIN = 42;
export const FIELD_LABEL_WIDTH = 110;
export const colours = {
  ink: rgb(0.11, 0.14, 0.19),
  muted: rgb(0.36, 0.4, 0.45),
  rule: rgb(0.86, 0.85, 0.83),
  accent: rgb(0.05, 0.37, 0.39),
  danger: rgb(0.64, 0.15, 0.18),
  ok: rgb(0.18, 0.42, 0.18),
  caution: rgb(0.54, 0.35, 0),
  paper: rgb(0.965, 0.96, 0.945),
};

export interface TextStyle {
  size?: number;
  bold?: boolean;
  colour?: RGB;
}

export interface Column {
  title: string;
  width: number;
  align?: "left" | "right";
}

export class ReportDocument {
  readonly pdf: PDFDocument;
  private regular!: PDFFont;
  private bold!: PDFFont;
  page!: PDFPage;
  y = 0;
  private constructor(
    pdf: PDFDocument,
    private readonly head: string,
  ) {
    this.pdf = pdf;
  }

  static async create(title: string, head: string): Promise<ReportDocument> {
    const pdf = await PDFDocument.create();
    pdf.registerFontkit(fontkit);
    pdf.setTitle(title);
    pdf.setCreator("Tympan");
    pdf.setProducer("Tympan (pdf-lib)");
    const doc = new ReportDocument(pdf, head);
    const [regular, bold] = await loadFonts();
    doc.regular = await pdf.embedFont(regular, { subset: true });
    doc.bold = await pdf.embedFont(bold, { subset: true });
    doc.newPage();
    return doc;
  }

  get contentWidth() {
    return A4.width - 2 * MARGIN;
  }

  font(bold = false) {
    return bold ? this.bold : this.regular;
  }

  newPage() {
    this.page = this.pdf.addPage([A4.width, A4.height]);
    this.page.drawText(this.head, { x: MARGIN, y: A4.height - 28, size: 8, font: this.regular, color: colours.muted });
    this.page.drawLine({ start: { x: MARGIN, y: A4.height - 33 }, end: { x: A4.width - MARGIN, y: A4.height - 33 }, thickness: 0.5, color: colours.rule });
    this.y = A4.height - 52;
  }

  /** Starts a new page when fewer than `height` points are left above the foot. */
  need(height: number) {
    if (this.y - height < MARGIN + 24) this.newPage();
  }

  /** Splits text into lines that fit `width` (words longer than a line are cut, e.g. a sha256). */
  wrap(text: string, width: number, style: TextStyle = {}): string[] {
    const font = this.font(style.bold);
    const size = style.size ?? 9.5;
    const lines: string[] = [];
    for (const paragraph of text.replace(/\r\n?/g, "\n").split("\n")) {
      let line = "";
      for (const word of paragraph.split(/\s+/).filter(Boolean)) {
        const candidate = line ? `${line} ${word}` : word;
        if (font.widthOfTextAtSize(candidate, size) <= width) {
          line = candidate;
          continue;
        }
        if (line) lines.push(line);
        let rest = word;
        while (font.widthOfTextAtSize(rest, size) > width) {
          let cut = rest.length - 1;
          while (cut > 1 && font.widthOfTextAtSize(rest.slice(0, cut), size) > width) cut--;
          lines.push(rest.slice(0, cut));
          rest = rest.slice(cut);
        }
        line = rest;
      }
      lines.push(line);
    }
    return lines;
  }

  text(text: string, style: TextStyle = {}, indent = 0) {
    const size = style.size ?? 9.5;
    const leading = size * 1.35;
    for (const line of this.wrap(text, this.contentWidth - indent, style)) {
      this.need(leading);
      this.page.drawText(line, { x: MARGIN + indent, y: this.y - size, size, font: this.font(style.bold), color: style.colour ?? colours.ink });
      this.y -= leading;
    }
  }

  heading(text: string, size = 13) {
    this.need(size * 2.6);
    this.y -= size * 0.6;
    this.text(text, { size, bold: true });
    this.y -= 2;
  }

  gap(points = 8) {
    this.y -= points;
  }

  /**
   * Label–value lines, labels in a narrow muted column. 110 pt holds the longest label (about 85 pt) and leaves
   * the values 401 pt: a sha256 (64 hex digits, at most 387 pt at 9.5 pt) stays on one line, so it can be read
   * and searched whole (at 130 pt some hashes lost their last digit to a second line).
   */
  fields(rows: [string, string][], labelWidth = FIELD_LABEL_WIDTH) {
    for (const [label, value] of rows) {
      const lines = this.wrap(value, this.contentWidth - labelWidth, {});
      this.need(lines.length * 12.8);
      this.page.drawText(label, { x: MARGIN, y: this.y - 9.5, size: 9.5, font: this.regular, color: colours.muted });
      for (const line of lines) {
        this.page.drawText(line, { x: MARGIN + labelWidth, y: this.y - 9.5, size: 9.5, font: this.regular, color: colours.ink });
        this.y -= 12.8;
      }
    }
  }

  /** A table whose header repeats on each new page; cells wrap within their column. */
  table(columns: Column[], rows: { cells: string[]; colour?: RGB; bold?: boolean }[], size = 8.5) {
    const leading = size * 1.3;
    const drawHeader = () => {
      this.need(leading * 2);
      let x = MARGIN;
      for (const c of columns) {
        this.cell(c.title, x, c, { size, bold: true, colour: colours.muted });
        x += c.width;
      }
      this.y -= leading + 2;
      this.page.drawLine({ start: { x: MARGIN, y: this.y + 3 }, end: { x: MARGIN + columns.reduce((s, c) => s + c.width, 0), y: this.y + 3 }, thickness: 0.5, color: colours.rule });
    };
    drawHeader();
    for (const row of rows) {
      const wrapped = row.cells.map((cell, i) => this.wrap(cell, columns[i].width - 4, { size, bold: row.bold }));
      const height = Math.max(...wrapped.map((w) => w.length)) * leading + 3;
      if (this.y - height < MARGIN + 24) {
        this.newPage();
        drawHeader();
      }
      let x = MARGIN;
      wrapped.forEach((lines, i) => {
        lines.forEach((line, n) => this.cell(line, x, columns[i], { size, bold: row.bold, colour: row.colour }, n * leading));
        x += columns[i].width;
      });
      this.y -= height;
    }
  }

  private cell(text: string, x: number, column: Column, style: TextStyle, down = 0) {
    const size = style.size ?? 8.5;
    const font = this.font(style.bold);
    const dx = column.align === "right" ? column.width - 4 - font.widthOfTextAtSize(text, size) : 0;
    this.page.drawText(text, { x: x + dx, y: this.y - size - down, size, font, color: style.colour ?? colours.ink });
  }

  async image(bytes: Uint8Array): Promise<PDFImage | null> {
    const png = bytes[0] === 0x89 && bytes[1] === 0x50;
    const jpeg = bytes[0] === 0xff && bytes[1] === 0xd8;
    if (!png && !jpeg) return null;
    return png ? this.pdf.embedPng(bytes) : this.pdf.embedJpg(bytes);
  }

  /** Page numbers and a generated-at line on every page, then the bytes. */
  async finish(foot: string): Promise<Uint8Array> {
    const pages = this.pdf.getPages();
    pages.forEach((page, i) => {
      page.drawLine({ start: { x: MARGIN, y: 34 }, end: { x: A4.width - MARGIN, y: 34 }, thickness: 0.5, color: colours.rule });
      page.drawText(foot, { x: MARGIN, y: 22, size: 7.5, font: this.regular, color: colours.muted });
      const number = `Page ${i + 1} of ${pages.length}`;
      page.drawText(number, { x: A4.width - MARGIN - this.regular.widthOfTextAtSize(number, 7.5), y: 22, size: 7.5, font: this.regular, color: colours.muted });
    });
    return this.pdf.save();
  }
}

export const CAUTIONS = [
  "A flatbed scan is not a calibrated measurement: colour figures (ΔE00) are indicative only, and a spectrophotometer decides on colour.",
  "Tympan shows differences; it does not release product. Sign-off stays with qualified staff under the customer's and the regulator's rules.",
];

export const utc = (iso: string | Date | null | undefined) =>
  iso ? `${(typeof iso === "string" ? iso : iso.toISOString()).slice(0, 19).replace("T", " ")} UTC` : "—";
