// JavaScript hidden in a compressed object stream passes the streaming upload check (it cannot decompress);
// the rasteriser finds it and refuses the revision in plain words.
import "./support/test-env";
import { eq } from "drizzle-orm";
import { PDFDocument } from "pdf-lib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db/client";
import { artworkRevisions } from "@/db/schema";
import { approveArtwork, uploadArtwork } from "@/lib/pipeline/artworks";
import { ensureBucket } from "@/storage/objects";
import { pdfHasScript } from "@/worker/processors/pdf-scripts";
import { makeFixture, multipart, until } from "./support/fixtures";
import { emptyQueues, startWorker, type WorkerProcess } from "./support/worker-process";

async function scriptedPdf(useObjectStreams: boolean) {
  const doc = await PDFDocument.create();
  doc.addPage([300, 300]);
  doc.addJavaScript("greet", "app.alert('hello');");
  return doc.save({ useObjectStreams });
}

describe("artwork with JavaScript", () => {
  let worker: WorkerProcess;
  beforeAll(async () => {
    await ensureBucket();
    await emptyQueues();
    worker = startWorker();
    await worker.waitFor(/worker ready/);
  });
  afterAll(() => worker?.stop());

  it("pdfHasScript sees scripts inside object streams and none in a plain page", async () => {
    expect(await pdfHasScript(await scriptedPdf(true))).toBe(true);
    const plain = await PDFDocument.create();
    plain.addPage([300, 300]);
    expect(await pdfHasScript(await plain.save())).toBe(false);
  });

  it("a compressed script is refused when the revision is rasterised, with the reason recorded", async () => {
    const fx = await makeFixture();
    const uploaded = await uploadArtwork(fx.actors.prepress, fx.jobId, multipart([{ name: "hidden.pdf", data: await scriptedPdf(true) }]));
    expect(uploaded.duplicate).toBe(false);
    await approveArtwork(fx.actors.prepress, uploaded.revisionId);
    const revision = await until("raster failure", async () => {
      const [r] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, uploaded.revisionId));
      return r.rasterStatus === "failed" ? r : null;
    });
    expect(revision.rasterError).toMatch(/contains JavaScript/);
    expect(worker.child.exitCode).toBeNull();
  });
});
