// One inspection of one press-sheet scan against the approved artwork's cached raster. Runs in a worker
// thread (CPU-heavy). Safe to run again at any point: findings are replaced in one transaction, crops are
// stored under fresh keys and the old ones removed only after the commit.
import { DelayedError, UnrecoverableError, type SandboxedJob } from "bullmq";
import sharp from "sharp";
import { env } from "@/lib/env";
import { inspectSheet, likelyScannerBlurPx } from "@/lib/imaging/inspect";
import { loadScan } from "@/lib/imaging/scan/load-scan";
import { artworkAtDpi } from "@/lib/imaging/rasterise/rasterise";
import { ImagingError, type ArtworkRaster, type InspectionProgress } from "@/lib/imaging/types";
import {
  failInspection,
  loadInspectionWork,
  markRunning,
  profileOf,
  saveInspectionResult,
  setProgress,
  setScanDpi,
  type InspectionWork,
  type StoredCrops,
} from "@/lib/pipeline/records";
import { expandExcludedAreas, upsAreaOf } from "@/lib/pipeline/excluded-areas";
import { enqueueMail, enqueueRasterise, type InspectData } from "@/lib/queue/queues";
import { keys, newObjectId, sourceObjectId } from "@/storage/keys";
import { deleteUnder, getObjectBuffer, putObject } from "@/storage/objects";
import { bucketSupply } from "../prepared-artwork";
import { buildTiles } from "./tiles";

const RASTER_WAIT_MS = 3000;

// Inspections run in parallel worker threads (WORKER_CONCURRENCY), which is where the cores go: libvips keeps to
// one thread a call instead of every call reaching for every core (the setting is the process's).
sharp.concurrency(1);

/**
 * The last artwork this thread inspected against, kept decoded: the engine prepares the artwork side once per
 * raster buffer (lib/imaging/compare/prepared.ts), and the sheets of a press run come one after another with the same
 * approved revision. One is kept, so memory stays at one artwork per thread.
 */
let lastArtwork: { key: string; artwork: ArtworkRaster } | null = null;

async function loadArtwork(work: InspectionWork): Promise<ArtworkRaster> {
  const key = work.revision.rasterKeys?.[0];
  if (!key) throw new Error("The artwork raster has no storage key");
  const cacheKey = `${work.revision.id}:${key}:${work.revision.rasterDpi}`;
  if (lastArtwork?.key === cacheKey) return lastArtwork.artwork;
  lastArtwork = null;
  const artwork = await decodeArtwork(work, key);
  lastArtwork = { key: cacheKey, artwork };
  return artwork;
}

async function decodeArtwork(work: InspectionWork, key: string): Promise<ArtworkRaster> {
  const png = await getObjectBuffer(key);
  const { data, info } = await sharp(png).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return {
    width: info.width,
    height: info.height,
    data: new Uint8Array(data.buffer, data.byteOffset, data.length),
    dpi: work.revision.rasterDpi!,
    widthMm: work.revision.pageWidthUm / 1000,
    heightMm: work.revision.pageHeightUm / 1000,
    box: work.revision.pageBox === "MediaBox" ? "MediaBox" : "TrimBox",
  };
}

/** Throttled progress: the page polls the database, so write only when something visible changed. */
function progressWriter(inspectionId: number, job: SandboxedJob) {
  let last = { stage: "", percent: -1, at: 0 };
  return async (stage: string, percent: number) => {
    const now = Date.now();
    if (stage === last.stage && (percent - last.percent < 3 || now - last.at < 500)) return;
    last = { stage, percent, at: now };
    await Promise.all([setProgress(inspectionId, stage, percent), job.updateProgress({ stage, percent })]);
  };
}

export default async function inspect(job: SandboxedJob<InspectData>, token?: string) {
  const id = job.data.inspectionId;
  const work = await loadInspectionWork(id);
  if (!work) throw new UnrecoverableError(`Inspection ${id} no longer exists`);
  if (work.inspection.status === "done") {
    // A run that committed but died before it finished the job: only the e-mail may still be missing.
    await enqueueMail({ kind: "sheet_ready", inspectionId: id }, work.inspection.attempts);
    return { inspectionId: id, findings: null, alreadyDone: true };
  }
  const { revision } = work;
  if (revision.rasterStatus === "failed") {
    const message = `The approved artwork could not be prepared for comparison: ${revision.rasterError ?? "unknown reason"}`;
    await failInspection(id, "artwork_unusable", message);
    await enqueueMail({ kind: "sheet_failed", inspectionId: id, reason: "inspection_failed" }, work.inspection.attempts + 1);
    throw new UnrecoverableError(message);
  }
  if (revision.rasterStatus !== "ready") {
    // The raster is being made (approval just happened): look again shortly, without using up an attempt.
    await setProgress(id, "waiting for artwork", 0);
    await enqueueRasterise(revision.id, revision.rasterDpi ?? work.job.artworkDpi);
    await job.moveToDelayed(Date.now() + RASTER_WAIT_MS, token);
    throw new DelayedError();
  }

  await markRunning(id);
  const run = work.inspection.attempts + 1;
  const progress = progressWriter(id, job);
  try {
    const approved = await loadArtwork(work);
    await progress("load", 3);
    const scan = await loadScan(new Uint8Array(await getObjectBuffer(work.scan.objectKey)), {
      dpi: work.scan.dpi > 0 ? work.scan.dpi : undefined,
      maxMegapixels: env.SCAN_MAX_MEGAPIXELS,
    });
    if (work.scan.dpi !== Math.round(scan.dpi)) await setScanDpi(work.scan.id, scan.dpi);
    // A scan coarser than the approved raster is compared at its own resolution (the tiles follow it).
    const artwork = await artworkAtDpi(approved, scan.dpi);
    await progress("align", 8);

    const r = work.revision;
    const ups = { rows: r.upsRows, columns: r.upsColumns, areaMm: upsAreaOf(r) ?? undefined };
    // The revision's excluded areas (variable data) join the profile's own; "up" areas repeat in every up.
    const profile = profileOf(work.profile);
    profile.excludedAreasMm.push(...expandExcludedAreas(r.excludedAreas ?? [], ups, { widthMm: artwork.widthMm, heightMm: artwork.heightMm }));
    const result = await inspectSheet({
      artwork,
      scan,
      profile,
      ups,
      crops: true,
      prepared: bucketSupply(sourceObjectId(r.sourceKey), artwork, likelyScannerBlurPx(artwork.dpi)),
      onProgress: (p: InspectionProgress) => void progress(p.stage, 8 + p.percent * 0.82),
    });

    await progress("store crops", 91);
    const prefix = keys.cropPrefix(String(id));
    const crops: (StoredCrops | null)[] = [];
    for (const finding of result.findings) {
      if (!finding.crops) {
        crops.push(null);
        continue;
      }
      const findingObject = newObjectId();
      const stored: StoredCrops = {
        artwork: keys.crop(String(id), findingObject, "artwork"),
        scan: keys.crop(String(id), findingObject, "scan"),
        difference: keys.crop(String(id), findingObject, "difference"),
      };
      await Promise.all([
        putObject(stored.artwork, finding.crops.artwork, "image/png"),
        putObject(stored.scan, finding.crops.scan, "image/png"),
        putObject(stored.difference, finding.crops.difference, "image/png"),
      ]);
      crops.push(stored);
    }
    await progress("save", 98);
    await saveInspectionResult(id, result, crops);
    // Crops of an earlier, interrupted run are no longer referenced.
    const keep = new Set(crops.flatMap((c) => (c ? [c.artwork, c.scan, c.difference] : [])));
    await deleteUnder(prefix, keep).catch(() => undefined);
    await enqueueMail({ kind: "sheet_ready", inspectionId: id }, run);
    // The viewer's tiles come after the result is safe: a failure there marks the tiles, not the inspection.
    const tiles = await buildTiles(id, { artwork, scan, alignment: result.alignment });
    return { inspectionId: id, findings: result.findings.length, tiles: tiles?.files ?? null, timingsMs: result.timingsMs };
  } catch (error) {
    if (error instanceof ImagingError) {
      // Bad input (unreadable file, wrong artwork, oversize scan): trying again cannot help.
      await failInspection(id, error.code, error.message);
      await enqueueMail({ kind: "sheet_failed", inspectionId: id, reason: "inspection_failed" }, run);
      throw new UnrecoverableError(error.message);
    }
    await setProgress(id, "waiting to retry", 0).catch(() => undefined);
    throw error;
  }
}
