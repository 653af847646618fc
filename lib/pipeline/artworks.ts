// Artwork revisions: upload (prepress), approval (which queues the one rasterisation of the revision).
import { and, desc, eq, ne, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { artworkRevisions, jobs } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { authorize, type Actor } from "@/lib/auth/policy";
import { env } from "@/lib/env";
import { notFound } from "@/lib/errors";
import { enqueueRasterise } from "@/lib/queue/queues";
import { receiveUpload } from "@/lib/uploads/receive";
import { keys, newObjectId } from "@/storage/keys";
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
    return await db.transaction(async (tx) => {
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
  if (revision.status !== "draft") {
    throw conflict("artwork_not_draft", `Revision ${revision.revision} is already ${revision.status}; only a draft can be approved.`);
  }
  const dpi = job.artworkDpi || env.ARTWORK_DPI;
  await db.transaction(async (tx) => {
    await tx
      .update(artworkRevisions)
      .set({ status: "superseded" })
      .where(and(eq(artworkRevisions.jobId, job.id), eq(artworkRevisions.status, "approved"), ne(artworkRevisions.id, revision.id)));
    await tx
      .update(artworkRevisions)
      .set({ status: "approved", approvedBy: actor.id, approvedAt: new Date(), rasterStatus: "pending", rasterDpi: dpi, rasterError: null })
      .where(eq(artworkRevisions.id, revision.id));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "artwork.approve",
      subjectType: "artwork_revision",
      subjectId: revision.id,
      details: { jobId: job.id, revision: revision.revision },
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
