// Preflight of artwork PDFs: fonts used without being embedded. PDFs are built with pdf-lib; the rule checked is
// ISO 32000-1:2008 §9.8 (font descriptors: the font program is in FontFile, FontFile2 or FontFile3; the standard
// 14 fonts may go without a descriptor) — from memory — and poppler's pdffonts (an independent reader) is asked
// the same question where it is installed.
import { execFileSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import fontkit from "@pdf-lib/fontkit";
import { PDFDocument, PDFName, PDFRef, StandardFonts, type PDFObject } from "pdf-lib";
import { describe, expect, it } from "vitest";
import { preflightArtwork } from "@/lib/pipeline/preflight";

// Liberation Sans ships with pdfjs-dist (SIL Open Font Licence); any TrueType file would do.
const LIBERATION_SANS = path.resolve("node_modules/pdfjs-dist/standard_fonts/LiberationSans-Regular.ttf");
const hasPdffonts = existsSync("/usr/bin/pdffonts");

async function helveticaPdf(): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  const page = doc.addPage([300, 200]);
  page.drawText("Kestrelmoor Breakfast Tea", { x: 20, y: 150, size: 12, font: await doc.embedFont(StandardFonts.Helvetica) });
  page.drawText("40 bags", { x: 20, y: 120, size: 12, font: await doc.embedFont(StandardFonts.HelveticaBold) });
  return doc.save();
}

async function embeddedTrueTypePdf(): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const font = await doc.embedFont(readFileSync(LIBERATION_SANS), { subset: true });
  doc.addPage([300, 200]).drawText("Alverin 20 mg tablets", { x: 20, y: 150, size: 12, font });
  return doc.save();
}

/** pdffonts' answer: name → embedded yes/no (its table: name, type, encoding, emb, sub, uni, object ID). */
function pdffontsOf(bytes: Uint8Array): Map<string, boolean> {
  const dir = mkdtempSync(path.join(tmpdir(), "preflight-"));
  try {
    const file = path.join(dir, "artwork.pdf");
    writeFileSync(file, bytes);
    const lines = execFileSync("/usr/bin/pdffonts", [file], { encoding: "utf8" }).trim().split("\n").slice(2);
    return new Map(lines.map((line) => {
      const cells = line.trim().split(/\s+/);
      return [cells[0], cells[cells.length - 5] === "yes"];
    }));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

describe("artwork preflight: fonts not embedded", () => {
  it("reports the standard 14 fonts pdf-lib writes without embedding (no FontDescriptor, §9.8)", async () => {
    expect(await preflightArtwork(await helveticaPdf())).toEqual({ nonEmbeddedFonts: ["Helvetica", "Helvetica-Bold"] });
  });

  it("does not report an embedded TrueType font (Type0 → CIDFontType2 with FontFile2)", async () => {
    expect(await preflightArtwork(await embeddedTrueTypePdf())).toEqual({ nonEmbeddedFonts: [] });
  });

  it.skipIf(!hasPdffonts)("agrees with poppler's pdffonts on both files", async () => {
    const helvetica = pdffontsOf(await helveticaPdf());
    expect([...helvetica]).toEqual([["Helvetica", false], ["Helvetica-Bold", false]]);
    const embedded = pdffontsOf(await embeddedTrueTypePdf());
    expect([...embedded.values()]).toEqual([true]);
  });

  it("finds a font that is only used inside a Form XObject (a placed page)", async () => {
    const placed = await PDFDocument.load(await helveticaPdf());
    const doc = await PDFDocument.create();
    const [form] = await doc.embedPdf(placed, [0]);
    doc.addPage([600, 400]).drawPage(form, { x: 10, y: 10 });
    expect(await preflightArtwork(await doc.save())).toEqual({ nonEmbeddedFonts: ["Helvetica", "Helvetica-Bold"] });
  });

  it("does not report a Type3 font (its glyphs are drawn by the PDF itself)", async () => {
    const doc = await PDFDocument.create();
    const page = doc.addPage([300, 200]);
    const type3 = doc.context.register(
      doc.context.obj({
        Type: "Font",
        Subtype: "Type3",
        FontBBox: [0, 0, 1000, 1000],
        FontMatrix: [0.001, 0, 0, 0.001, 0, 0],
        CharProcs: {},
        Encoding: { Type: "Encoding", Differences: [] },
        FirstChar: 0,
        LastChar: 0,
        Widths: [0],
      }),
    );
    page.node.setFontDictionary(PDFName.of("T3"), type3);
    expect(await preflightArtwork(await doc.save())).toEqual({ nonEmbeddedFonts: [] });
  });

  it("reports a Type0 font whose descendant has a descriptor without any font file", async () => {
    const doc = await PDFDocument.create();
    const page = doc.addPage([300, 200]);
    const { context } = doc;
    const descriptor = context.register(context.obj({ Type: "FontDescriptor", FontName: "Wrenfold-Sans", Flags: 32 }));
    const cidFont = context.register(
      context.obj({ Type: "Font", Subtype: "CIDFontType2", BaseFont: "Wrenfold-Sans", FontDescriptor: descriptor }),
    );
    const type0 = context.register(
      context.obj({ Type: "Font", Subtype: "Type0", BaseFont: "Wrenfold-Sans", Encoding: "Identity-H", DescendantFonts: [cidFont] }),
    );
    page.node.setFontDictionary(PDFName.of("F0"), type0);
    expect(await preflightArtwork(await doc.save())).toEqual({ nonEmbeddedFonts: ["Wrenfold-Sans"] });
  });

  it("never throws on malformed font dictionaries or a Form XObject that contains itself; reports what it can read", async () => {
    const doc = await PDFDocument.create();
    const page = doc.addPage([300, 200]);
    const { context } = doc;
    const helvetica = context.register(context.obj({ Type: "Font", Subtype: "Type1", BaseFont: "Helvetica" }));
    const fonts: Record<string, PDFObject> = {
      A: context.obj(42), // not a dictionary at all
      B: PDFRef.of(9999), // points at no object
      C: context.obj({ Type: "Font", Subtype: "Type0", DescendantFonts: 5 }), // no name, descendants not an array
      D: context.obj({ Type: "Font", Subtype: "TrueType", BaseFont: "Oddly-Described", FontDescriptor: "Bogus" }),
      E: helvetica,
      F: helvetica, // the same font under two names is listed once
    };
    for (const [key, value] of Object.entries(fonts)) page.node.setFontDictionary(PDFName.of(key), value as PDFRef); // any object, as a damaged file has
    // A Form XObject whose resources name itself: the walk must end.
    const formRef = context.nextRef();
    const formResources = context.obj({ XObject: { Self: formRef }, Font: { H: helvetica } });
    context.assign(formRef, context.stream("", { Type: "XObject", Subtype: "Form", BBox: [0, 0, 10, 10], Resources: formResources }));
    page.node.setXObject(PDFName.of("X0"), formRef);
    const result = await preflightArtwork(await doc.save());
    expect(result).toEqual({ nonEmbeddedFonts: ["(unnamed font)", "Oddly-Described", "Helvetica"] });
  });

  it("answers null (not “all embedded”) for bytes that are no PDF, and does not throw on a truncated one", async () => {
    expect(await preflightArtwork(new TextEncoder().encode("not a PDF at all"))).toBeNull();
    const whole = await helveticaPdf();
    const truncated = await preflightArtwork(whole.subarray(0, Math.floor(whole.length / 2)));
    expect(truncated === null || Array.isArray(truncated.nonEmbeddedFonts)).toBe(true);
  });
});
