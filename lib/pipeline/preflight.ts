// Preflight of an artwork PDF: the fonts it uses without embedding them. A press's RIP substitutes its own font
// for such a font and pdf.js (our rasteriser) another, so the printed type differs from Tympan's raster and shows
// as false findings on text. Print-ready exchange PDFs must embed every font: ISO 15930-7:2010 (PDF/X-4), fonts
// must be embedded (clause reference from memory). Pure: bytes in, plain object out; never throws on odd input.
import { PDFArray, PDFDict, PDFDocument, PDFName, PDFStream, type PDFObject } from "pdf-lib";
import type { ArtworkPreflight } from "@/db/schema";

/** At most this many names are kept: enough to act on, small enough for the revision's row. */
export const MAX_FONTS_LISTED = 100;

const name = (key: string) => PDFName.of(key);
const N = {
  Font: name("Font"),
  XObject: name("XObject"),
  Pattern: name("Pattern"),
  Resources: name("Resources"),
  Subtype: name("Subtype"),
  Form: name("Form"),
  BaseFont: name("BaseFont"),
  FontDescriptor: name("FontDescriptor"),
  DescendantFonts: name("DescendantFonts"),
  Type0: name("Type0"),
  Type3: name("Type3"),
  // ISO 32000-1:2008 §9.8 (font descriptors): the embedded font program is in one of these (from memory).
  fontFiles: [name("FontFile"), name("FontFile2"), name("FontFile3")],
};

/** The preflight of an artwork PDF, or null when pdf-lib cannot read it at all (the rasteriser says why). */
export async function preflightArtwork(bytes: Uint8Array): Promise<ArtworkPreflight | null> {
  let doc: PDFDocument;
  try {
    doc = await PDFDocument.load(bytes, { ignoreEncryption: true, updateMetadata: false, throwOnInvalidObject: false });
  } catch {
    return null;
  }
  return { nonEmbeddedFonts: nonEmbeddedFonts(doc) };
}

/**
 * BaseFont names of the fonts used without an embedded font program, in the order first met, each once: every
 * page's /Resources /Font, and the resources of Form XObjects, tiling patterns and Type3 glyph procedures within,
 * recursively. A font with no FontDescriptor (the standard 14, as pdf-lib writes StandardFonts) is not embedded;
 * a Type0 font is judged by its descendant CIDFont's descriptor; Type3 fonts draw their glyphs themselves.
 */
export function nonEmbeddedFonts(doc: PDFDocument): string[] {
  const found = new Set<string>();
  const visited = new Set<PDFObject>();
  const lookup = (object: PDFObject | undefined): PDFObject | undefined => {
    try {
      return object === undefined ? undefined : doc.context.lookup(object);
    } catch {
      return undefined;
    }
  };
  const dictOf = (object: PDFObject | undefined): PDFDict | undefined => {
    const value = lookup(object);
    if (value instanceof PDFDict) return value;
    if (value instanceof PDFStream) return value.dict;
    return undefined;
  };
  const entriesOf = (dict: PDFDict | undefined) => (dict ? dict.entries() : []);

  function checkFont(font: PDFDict) {
    const subtype = lookup(font.get(N.Subtype));
    if (subtype === N.Type3) {
      walkResources(dictOf(font.get(N.Resources)));
      return;
    }
    let described = font;
    if (subtype === N.Type0) {
      const descendants = lookup(font.get(N.DescendantFonts));
      const descendant = descendants instanceof PDFArray && descendants.size() > 0 ? dictOf(descendants.get(0)) : undefined;
      if (descendant) described = descendant;
    }
    const descriptor = dictOf(described.get(N.FontDescriptor));
    const embedded = descriptor !== undefined && N.fontFiles.some((key) => lookup(descriptor.get(key)) instanceof PDFStream);
    if (!embedded) found.add(fontName(lookup(font.get(N.BaseFont))));
  }

  function walkResources(resources: PDFDict | undefined) {
    if (!resources || visited.has(resources)) return;
    visited.add(resources);
    for (const [, ref] of entriesOf(dictOf(resources.get(N.Font)))) {
      const font = dictOf(ref);
      if (!font || visited.has(font)) continue;
      visited.add(font);
      try {
        checkFont(font);
      } catch {
        // A font dictionary too odd to read: skip it, keep the others.
      }
    }
    // Form XObjects and tiling patterns carry resources of their own (images have none, so dictOf finds none).
    for (const group of [N.XObject, N.Pattern]) {
      for (const [, ref] of entriesOf(dictOf(resources.get(group)))) {
        const inner = dictOf(ref);
        if (!inner || visited.has(inner)) continue;
        visited.add(inner);
        if (group === N.XObject && lookup(inner.get(N.Subtype)) !== N.Form) continue;
        walkResources(dictOf(inner.get(N.Resources)));
      }
    }
  }

  let pages: ReturnType<PDFDocument["getPages"]> = [];
  try {
    pages = doc.getPages();
  } catch {
    // A broken page tree: nothing to walk.
  }
  for (const page of pages) {
    try {
      walkResources(page.node.Resources());
    } catch {
      // This page's resources are unreadable; the other pages still count.
    }
  }
  return [...found].slice(0, MAX_FONTS_LISTED);
}

function fontName(baseFont: PDFObject | undefined): string {
  if (baseFont instanceof PDFName) {
    const text = baseFont.decodeText().trim();
    if (text) return text;
  }
  return "(unnamed font)";
}
