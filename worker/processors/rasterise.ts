// Rasterises an approved artwork revision once, at the job's resolution, and caches the page in storage.
// Cached as PNG: lossless, decoded by sharp in a fraction of the render time, viewable by anyone with the
// key, and no extra dependency (Node 20 has no zstd; raw+gzip would be larger and slower to read than PNG).
import { UnrecoverableError, type SandboxedJob } from "bullmq";
import sharp from "sharp";
import { contrastWindows, likelyScannerBlurPx } from "@/lib/imaging/inspect";
import { getProfile } from "@/lib/imaging/profiles";
import { MIN_DPI, rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import { ImagingError, type RgbaImage } from "@/lib/imaging/types";
import { preflightArtwork } from "@/lib/pipeline/preflight";
import { failRaster, likelyRegistrationToleranceMm, loadRevisionWork, savePageSize, savePreflight, savePrepared, saveRaster } from "@/lib/pipeline/records";
import type { RasteriseData } from "@/lib/queue/queues";
import { keys, sourceObjectId } from "@/storage/keys";
import { preparedKey, storePrepared } from "../prepared-artwork";
import { pdfHasScript } from "./pdf-scripts";
import { getObjectBuffer, objectExists, putObject } from "@/storage/objects";

export { sourceObjectId };

/** Longest side of the page preview people draw excluded areas on, in pixels. */
export const PREVIEW_MAX_PX = 2000;

const previewOf = (image: ReturnType<typeof sharp>) =>
  image.resize({ width: PREVIEW_MAX_PX, height: PREVIEW_MAX_PX, fit: "inside", withoutEnlargement: true }).png({ compressionLevel: 6 }).toBuffer();

/** A small picture of page 1 at a low resolution, and the page's size, for a revision not yet approved. */
async function preview(work: NonNullable<Awaited<ReturnType<typeof loadRevisionWork>>>): Promise<{ key: string }> {
  const { revision } = work;
  const key = keys.preview(sourceObjectId(revision.sourceKey));
  const pdf = new Uint8Array(await getObjectBuffer(revision.sourceKey));
  if (await pdfHasScript(pdf)) throw new UnrecoverableError("The artwork PDF contains JavaScript; no preview is made.");
  // Before the page size: the job page stops polling once a draft's size is known, and prepress should see
  // the preflight then, before approving.
  await savePreflight(revision.id, await preflightArtwork(pdf));
  let page;
  try {
    // pdf.js's lowest resolution here; the preview is then scaled to at most PREVIEW_MAX_PX.
    page = await rasterisePage(pdf, { page: 1, dpi: MIN_DPI });
  } catch (error) {
    if (error instanceof ImagingError) throw new UnrecoverableError(error.message);
    throw error;
  }
  await putObject(key, await previewOf(sharp(page.data, { raw: { width: page.width, height: page.height, channels: 4 } })), "image/png");
  await savePageSize(revision.id, { widthMm: page.widthMm, heightMm: page.heightMm, box: page.box, pageCount: page.pageCount });
  return { key };
}

export default async function rasterise(job: SandboxedJob<RasteriseData>): Promise<{ key: string }> {
  const work = await loadRevisionWork(job.data.revisionId);
  if (!work) throw new UnrecoverableError(`Artwork revision ${job.data.revisionId} no longer exists`);
  if (job.data.preview) return preview(work);
  const { revision, job: printJob } = work;
  const dpi = revision.rasterDpi ?? printJob.artworkDpi;
  const key = keys.raster(sourceObjectId(revision.sourceKey), dpi);
  if (revision.rasterStatus === "ready" && revision.rasterKeys?.includes(key) && (await objectExists(key))) {
    if (!revision.preparedKey) await prepare(job, revision.id, sourceObjectId(revision.sourceKey), await decodeRaster(key, dpi), printJob);
    return { key };
  }

  const pdf = await getObjectBuffer(revision.sourceKey);
  if (await pdfHasScript(new Uint8Array(pdf))) {
    const message =
      "The artwork PDF contains JavaScript (inside compressed objects). Artwork with scripts is refused; export it again without scripts or actions and upload the new file.";
    await failRaster(revision.id, message);
    throw new UnrecoverableError(message);
  }
  // A revision approved before its preview ran (or from before preflights existed) gets one here.
  if (!revision.preflight) await savePreflight(revision.id, await preflightArtwork(new Uint8Array(pdf)));
  let page;
  try {
    page = await rasterisePage(new Uint8Array(pdf), { page: 1, dpi });
  } catch (error) {
    if (error instanceof ImagingError) {
      await failRaster(revision.id, error.message);
      throw new UnrecoverableError(error.message);
    }
    throw error;
  }
  await job.updateProgress({ stage: "store", percent: 80 });
  const png = await sharp(page.data, { raw: { width: page.width, height: page.height, channels: 4 } })
    .png({ compressionLevel: 3 })
    .toBuffer();
  await putObject(key, png, "image/png");
  await putObject(keys.preview(sourceObjectId(revision.sourceKey)), await previewOf(sharp(png)), "image/png");
  await saveRaster(revision.id, {
    key,
    dpi,
    widthMm: page.widthMm,
    heightMm: page.heightMm,
    box: page.box,
    pageCount: page.pageCount,
  });
  await prepare(job, revision.id, sourceObjectId(revision.sourceKey), { ...page, dpi }, printJob);
  return { key };
}

/**
 * The artwork's side of the comparison, prepared now for the likely scanner and the job's profile, so that the
 * first sheet does not pay for it (worker/prepared-artwork.ts). After the raster is saved: an inspection that
 * starts meanwhile prepares for itself. A failure here is logged only; sheets then prepare as they go.
 */
async function prepare(
  job: SandboxedJob<RasteriseData>,
  revisionId: number,
  objectId: string,
  art: RgbaImage & { dpi: number },
  printJob: { toleranceProfileId: number | null },
) {
  try {
    await job.updateProgress({ stage: "prepare", percent: 90 });
    const tolerance = (await likelyRegistrationToleranceMm(printJob)) ?? getProfile("strict-pharma").registrationToleranceMm;
    const windows = contrastWindows(art.dpi, tolerance, likelyScannerBlurPx(art.dpi));
    const key = preparedKey(objectId, art.dpi, windows);
    await storePrepared(key, art, windows);
    await savePrepared(revisionId, key);
  } catch (error) {
    console.warn(`artwork revision ${revisionId}: not prepared ahead (${(error as Error).message}); sheets prepare it instead`);
  }
}

async function decodeRaster(key: string, dpi: number): Promise<RgbaImage & { dpi: number }> {
  const { data, info } = await sharp(await getObjectBuffer(key)).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return { width: info.width, height: info.height, data: new Uint8Array(data.buffer, data.byteOffset, data.length), dpi };
}
