// Finds JavaScript anywhere in a PDF, including inside compressed object streams that the upload check cannot
// see: a document-level script (/Names → /JavaScript), an action of type /JavaScript (/S /JavaScript, ISO
// 32000-1 §12.6.4.16) or any dictionary carrying a /JS entry. pdf.js never runs scripts when rasterising; we
// refuse such artwork anyway so nobody approves a file that behaves differently in a viewer.
import { PDFDict, PDFDocument, PDFName } from "pdf-lib";

const JS = PDFName.of("JS");
const S = PDFName.of("S");
const JAVASCRIPT = PDFName.of("JavaScript");

export async function pdfHasScript(bytes: Uint8Array): Promise<boolean> {
  let doc: PDFDocument;
  try {
    doc = await PDFDocument.load(bytes, { ignoreEncryption: true, updateMetadata: false, throwOnInvalidObject: false });
  } catch {
    return false; // unreadable: the rasteriser reports that in its own words
  }
  for (const [, object] of doc.context.enumerateIndirectObjects()) {
    if (!(object instanceof PDFDict)) continue;
    if (object.has(JS) || object.get(S) === JAVASCRIPT || object.has(JAVASCRIPT)) return true;
  }
  return false;
}
