// Artwork revisions: upload (prepress), approval (which queues the one rasterisation of the revision).
import { and, desc, eq, inArray, ne, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { artworkRevisions, jobs } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { authorize, type Actor } from "@/lib/auth/policy";
import { env } from "@/lib/env";
import { notFound } from "@/lib/errors";
import { enqueuePreview, enqueueRasterise } from "@/lib/queue/queues";
import { receiveUpload } from "@/lib/uploads/receive";
import { AppError, invalidInput } from "@/lib/errors";
import { parseInput } from "@/lib/validation";
import type { ExcludedArea } from "@/db/schema";
import { areaOutOfBounds, excludedAreasInput, upsAreaOf } from "./excluded-areas";
import { keys, newObjectId, sourceObjectId } from "@/storage/keys";
import { objectExists } from "@/storage/objects";
import { conflict, loadJobFor } from "./access";

export interface ArtworkUploadResult {
  revisionId: number;
  revision: number;
  duplicate: boolean;
  message: string;
}

/** Streams one artwork PDF into storage and records it as the job's next draft revision. */
export async function uploadArtwork(actor: Actor, jobId: number, request: Request): Promise<ArtworkUploadResult> {
  const job = await loadJobFor(actor, jobId, "artwork.upload");
  const upload = await receiveUpload(request, {
    kind: "artwork",
    maxBytes: env.ARTWORK_MAX_BYTES,
    maxPixels: Number.MAX_SAFE_INTEGER,
    maxFiles: 1,
    keyFor: () => keys.artworkSource(newObjectId()),
  });
  const [file] = upload.files;
  try {
    const result = await db.transaction(async (tx) => {
      // Lock the job row: two uploads at once must not both become "revision 3".
      await tx.select({ id: jobs.id }).from(jobs).where(eq(jobs.id, job.id)).for("update");
      const [same] = await tx
        .select({ id: artworkRevisions.id, revision: artworkRevisions.revision })
        .from(artworkRevisions)
        .where(and(eq(artworkRevisions.jobId, job.id), eq(artworkRevisions.sourceSha256, file.sha256)))
        .limit(1);
      if (same) {
        await upload.discard();
        return {
          revisionId: same.id,
          revision: same.revision,
          duplicate: true,
          message: `“${file.fileName}” is the same file as revision ${same.revision}; nothing new was stored.`,
        };
      }
      const [{ next }] = await tx
        .select({ next: sql<number>`coalesce(max(${artworkRevisions.revision}), 0) + 1`.mapWith(Number) })
        .from(artworkRevisions)
        .where(eq(artworkRevisions.jobId, job.id));
      const [{ id }] = await tx
        .insert(artworkRevisions)
        .values({
          jobId: job.id,
          revision: next,
          sourceKey: file.key,
          sourceSha256: file.sha256,
          originalFilename: file.fileName,
          byteSize: file.bytes,
          // The page size is measured when the revision is rasterised; the web process never parses PDFs.
          pageWidthUm: 0,
          pageHeightUm: 0,
          upsRows: job.upsRows,
          upsColumns: job.upsColumns,
          uploadedBy: actor.id,
        })
        .$returningId();
      await recordAudit(tx, {
        actorId: actor.id,
        action: "artwork.upload",
        subjectType: "artwork_revision",
        subjectId: id,
        details: { jobId: job.id, revision: next, sha256: file.sha256, bytes: file.bytes },
      });
      return { revisionId: id, revision: next, duplicate: false, message: `Stored as revision ${next} (draft).` };
    });
    // A picture of the page for drawing excluded areas; if Redis is down, the preview route asks again later.
    if (!result.duplicate) await enqueuePreview(result.revisionId).catch((error) => console.error("Queueing the artwork preview failed:", error));
    return result;
  } catch (error) {
    // No row was written: the stored object must go too.
    await upload.discard();
    throw error;
  }
}

/** Approves a draft revision: it becomes the one scans are compared with; an earlier approved one is superseded. */
export async function approveArtwork(actor: Actor, revisionId: number): Promise<{ revisionId: number; dpi: number }> {
  const [revision] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId)).limit(1);
  if (!revision) throw notFound("The artwork revision");
  const job = await loadJobFor(actor, revision.jobId, "artwork.approve");
  authorize(actor, "artwork.approve", { customerId: job.customerId });
  const dpi = job.artworkDpi || env.ARTWORK_DPI;
  await db.transaction(async (tx) => {
    // Lock the job row: two approvals at once must not leave two approved revisions.
    await tx.select({ id: jobs.id }).from(jobs).where(eq(jobs.id, job.id)).for("update");
    const [current] = await tx.select({ status: artworkRevisions.status }).from(artworkRevisions).where(eq(artworkRevisions.id, revision.id));
    if (current.status !== "draft") {
      throw conflict("artwork_not_draft", `Revision ${revision.revision} is already ${current.status}; only a draft can be approved.`);
    }
    const previous = await tx
      .select({ id: artworkRevisions.id, revision: artworkRevisions.revision })
      .from(artworkRevisions)
      .where(and(eq(artworkRevisions.jobId, job.id), eq(artworkRevisions.status, "approved"), ne(artworkRevisions.id, revision.id)));
    const now = new Date();
    if (previous.length > 0) {
      await tx
        .update(artworkRevisions)
        .set({ status: "superseded", supersededAt: now })
        .where(inArray(artworkRevisions.id, previous.map((p) => p.id)));
    }
    await tx
      .update(artworkRevisions)
      .set({ status: "approved", approvedBy: actor.id, approvedAt: now, rasterStatus: "pending", rasterDpi: dpi, rasterError: null })
      .where(eq(artworkRevisions.id, revision.id));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "artwork.approve",
      subjectType: "artwork_revision",
      subjectId: revision.id,
      details: { jobId: job.id, revision: revision.revision, excludedAreas: revision.excludedAreas.length, supersedes: previous.map((p) => p.revision) },
    });
  });
  // After the commit; if Redis is down now, the worker's start-up sweep queues it later.
  await enqueueRasterise(revision.id, dpi).catch((error) => console.error("Queueing rasterisation failed:", error));
  return { revisionId: revision.id, dpi };
}

export async function currentApprovedRevision(jobId: number) {
  const [row] = await db
    .select()
    .from(artworkRevisions)
    .where(and(eq(artworkRevisions.jobId, jobId), eq(artworkRevisions.status, "approved")))
    .orderBy(desc(artworkRevisions.revision))
    .limit(1);
  return row ?? null;
}

/**
 * Sets the excluded areas of a draft revision (prepress). An approved or superseded revision is locked: what
 * sheets were compared with stays as it was. Areas are checked against the page once its size is known.
 */
export async function setExcludedAreas(actor: Actor, revisionId: number, rawInput: unknown): Promise<{ revisionId: number; areas: ExcludedArea[] }> {
  const { areas } = parseInput(excludedAreasInput, rawInput);
  const [revision] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId)).limit(1);
  if (!revision) throw notFound("The artwork revision");
  const job = await loadJobFor(actor, revision.jobId, "artwork.upload");
  if (revision.pageWidthUm > 0 && revision.pageHeightUm > 0) {
    const page = { widthMm: revision.pageWidthUm / 1000, heightMm: revision.pageHeightUm / 1000 };
    const ups = { rows: revision.upsRows, columns: revision.upsColumns, areaMm: upsAreaOf(revision) ?? undefined };
    const errors: Record<string, string[]> = {};
    areas.forEach((area, i) => {
      const problem = areaOutOfBounds(area, ups, page);
      if (problem) errors[`areas.${i}`] = [`Area ${i + 1}${area.label ? ` (${area.label})` : ""}: ${problem}`];
    });
    if (Object.keys(errors).length) throw invalidInput(errors, Object.values(errors)[0][0]);
  }
  await db.transaction(async (tx) => {
    const [current] = await tx.select({ status: artworkRevisions.status }).from(artworkRevisions).where(eq(artworkRevisions.id, revision.id)).for("update");
    if (current.status !== "draft") {
      throw conflict("artwork_locked", `Revision ${revision.revision} is ${current.status}; its excluded areas are locked. Upload a new revision to change them.`);
    }
    await tx.update(artworkRevisions).set({ excludedAreas: areas }).where(eq(artworkRevisions.id, revision.id));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "artwork.excluded_areas",
      subjectType: "artwork_revision",
      subjectId: revision.id,
      details: { jobId: job.id, revision: revision.revision, areas },
    });
  });
  return { revisionId: revision.id, areas };
}

/**
 * The storage key of a revision's page preview, for whoever may read the job. While the worker is still making
 * it (or Redis lost the request) it is asked for again and the caller hears "not ready yet".
 */
export async function previewKeyFor(actor: Actor, revisionId: number): Promise<string> {
  const [revision] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId)).limit(1);
  if (!revision) throw notFound("The artwork revision");
  await loadJobFor(actor, revision.jobId, "job.read");
  const key = keys.preview(sourceObjectId(revision.sourceKey));
  if (await objectExists(key)) return key;
  await enqueuePreview(revision.id).catch((error) => console.error("Queueing the artwork preview failed:", error));
  throw new AppError("preview_pending", "The picture of this artwork page is still being made. It appears in a moment.", 404);
}
