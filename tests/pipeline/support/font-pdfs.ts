// Small artwork PDFs for the font preflight: one with the standard 14 Helvetica fonts pdf-lib writes without
// embedding, one with a TrueType font embedded (Liberation Sans, shipped by pdfjs-dist under the SIL Open Font
// Licence; any TrueType file would do).
import { readFileSync } from "node:fs";
import path from "node:path";
import fontkit from "@pdf-lib/fontkit";
import { PDFDocument, StandardFonts } from "pdf-lib";

const LIBERATION_SANS = path.resolve(import.meta.dirname, "../../../node_modules/pdfjs-dist/standard_fonts/LiberationSans-Regular.ttf");

export async function helveticaPdf(): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  const page = doc.addPage([300, 200]);
  page.drawText("Kestrelmoor Breakfast Tea", { x: 20, y: 150, size: 12, font: await doc.embedFont(StandardFonts.Helvetica) });
  page.drawText("40 bags", { x: 20, y: 120, size: 12, font: await doc.embedFont(StandardFonts.HelveticaBold) });
  return doc.save();
}

export async function embeddedTrueTypePdf(): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const font = await doc.embedFont(readFileSync(LIBERATION_SANS), { subset: true });
  doc.addPage([300, 200]).drawText("Alverin 20 mg tablets", { x: 20, y: 150, size: 12, font });
  return doc.save();
}
