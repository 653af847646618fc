// Preflight of artwork PDFs: fonts used without being embedded. PDFs are built with pdf-lib; the rule checked is
// ISO 32000-1:2008 §9.8 (font descriptors: the font program is in FontFile, FontFile2 or FontFile3; the standard
// 14 fonts may go without a descriptor) — from memory — and poppler's pdffonts (an independent reader) is asked
// the same question where it is installed. Then through the upload route and the real worker, as the job page
// and /api/v1 show it.
import "./support/test-env";
import { execFileSync } from "node:child_process";
import { existsSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { PDFDocument, PDFName, PDFRef, type PDFObject } from "pdf-lib";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { db } from "@/db/client";
import { artworkRevisions } from "@/db/schema";
import * as schemas from "@/lib/api/schemas";
import type { Actor } from "@/lib/auth/policy";
import { preflightArtwork } from "@/lib/pipeline/preflight";
import type { JobPipelineView } from "@/lib/pipeline/view";
import { ensureBucket } from "@/storage/objects";
import { embeddedTrueTypePdf, helveticaPdf } from "./support/font-pdfs";
import { makeFixture, multipart, until, type Fixture } from "./support/fixtures";
import { emptyQueues, startWorker, type WorkerProcess } from "./support/worker-process";

let actor: Actor;
vi.mock("@/lib/auth/request-actor", () => ({ requestActor: async () => actor }));
const { POST: postArtwork } = await import("@/app/api/jobs/[jobId]/artworks/route");
const { GET: getPipeline } = await import("@/app/api/jobs/[jobId]/pipeline/route");
const { GET: getJobV1 } = await import("@/app/api/v1/jobs/[jobId]/route");
const { POST: approve } = await import("@/app/api/artworks/[revisionId]/approve/route");

const hasPdffonts = existsSync("/usr/bin/pdffonts");

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
    const quiet = vi.spyOn(console, "warn").mockImplementation(() => {}); // pdf-lib narrates its repairs
    const truncated = await preflightArtwork(whole.subarray(0, Math.floor(whole.length / 2)));
    quiet.mockRestore();
    expect(truncated === null || Array.isArray(truncated.nonEmbeddedFonts)).toBe(true);
  });
});

describe("artwork preflight through the upload and the worker", () => {
  let fx: Fixture;
  let worker: WorkerProcess;
  const params = () => ({ params: Promise.resolve({ jobId: String(fx.jobId) }) });

  beforeAll(async () => {
    await ensureBucket();
    await emptyQueues();
    fx = await makeFixture({ rows: 1, columns: 1 });
    worker = startWorker();
    await worker.waitFor(/worker ready/);
  });
  afterAll(async () => {
    await worker?.stop("SIGTERM");
  });

  async function uploadAndWait(fileName: string, pdf: Uint8Array) {
    actor = fx.actors.prepress;
    const res = await postArtwork(multipart([{ name: fileName, data: pdf }]), params());
    expect(res.status).toBe(201);
    const { revisionId } = await res.json();
    // The job page stops polling once the draft's page size is known: the preflight must be there by then.
    const row = await until(`preview of ${fileName}`, async () => {
      const [r] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId));
      return r.pageWidthUm > 0 ? r : null;
    });
    return row;
  }

  it("a draft with Helvetica not embedded carries the preflight; one with its font embedded carries an empty list", async () => {
    const loose = await uploadAndWait("tea-carton-loose-fonts.pdf", await helveticaPdf());
    expect(loose.preflight).toEqual({ nonEmbeddedFonts: ["Helvetica", "Helvetica-Bold"] });
    const embedded = await uploadAndWait("tablet-carton-fonts-embedded.pdf", await embeddedTrueTypePdf());
    expect(embedded.preflight).toEqual({ nonEmbeddedFonts: [] });
  });

  it("the job page's view and /api/v1 show it, read-only to the customer too", async () => {
    actor = fx.actors.customer;
    const res = await getPipeline(new Request("http://x/"), params());
    expect(res.status).toBe(200);
    const view = (await res.json()) as JobPipelineView;
    expect(view.revisions.map((r) => [r.revision, r.preflight])).toEqual([
      [2, { nonEmbeddedFonts: [] }],
      [1, { nonEmbeddedFonts: ["Helvetica", "Helvetica-Bold"] }],
    ]);
    actor = fx.actors.qa;
    const v1 = await getJobV1(new Request("http://x/"), params());
    const job = schemas.JobDetail.parse(await v1.json());
    expect(job.revisions.find((r) => r.revision === 1)?.preflight?.nonEmbeddedFonts).toEqual(["Helvetica", "Helvetica-Bold"]);
  });

  it("a revision approved without a preflight (uploaded before there were any) gets one from its raster job", async () => {
    const [first] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.jobId, fx.jobId)).orderBy(artworkRevisions.revision).limit(1);
    await db.update(artworkRevisions).set({ preflight: null }).where(eq(artworkRevisions.id, first.id));
    actor = fx.actors.prepress;
    expect((await approve(new Request("http://x/"), { params: Promise.resolve({ revisionId: String(first.id) }) })).status).toBe(200);
    const rastered = await until("raster", async () => {
      const [r] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, first.id));
      return r.rasterStatus === "ready" ? r : null;
    });
    expect(rastered.preflight).toEqual({ nonEmbeddedFonts: ["Helvetica", "Helvetica-Bold"] });
  });
});
