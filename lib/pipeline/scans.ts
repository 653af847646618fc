// Scans of pulled press sheets (QA): stored, recorded with their sheet number, one inspection queued per scan.
import { and, asc, eq, inArray } from "drizzle-orm";
import { db, type Tx } from "@/db/client";
import { inspections, scans, toleranceProfiles } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import type { Actor } from "@/lib/auth/policy";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { enqueueInspection } from "@/lib/queue/queues";
import { receiveUpload, type ReceivedFile } from "@/lib/uploads/receive";
import { parseSheetNumber, sheetNumberFromName } from "@/lib/uploads/sheet-number";
import { isDuplicateKey } from "@/lib/validation";
import { keys, newObjectId, type ScanFormat } from "@/storage/keys";
import { conflict, loadJobFor } from "./access";
import { currentApprovedRevision } from "./artworks";

export interface ScanUploadItem {
  fileName: string;
  duplicate: boolean;
  scanId: number;
  inspectionId: number | null;
  sheetNumber: number | null;
  message: string;
}

/** The tolerance profile an upload asks for by name, else the job's own, else the first one (the strictest shipped). */
async function chooseProfile(name: string | undefined, jobProfileId: number | null) {
  const rows = await db.select({ id: toleranceProfiles.id, name: toleranceProfiles.name }).from(toleranceProfiles).orderBy(asc(toleranceProfiles.id));
  if (rows.length === 0) throw new AppError("no_profiles", "No tolerance profile is set up yet; ask an administrator.", 409);
  if (!name) return rows.find((r) => r.id === jobProfileId) ?? rows[0];
  const found = rows.find((r) => r.name === name);
  if (!found) throw new AppError("unknown_profile", `There is no tolerance profile named “${name}”.`, 422);
  return found;
}

function sheetNumberFor(file: ReceivedFile, fields: Record<string, string>, single: boolean): number | null {
  const typed = single ? fields.sheetNumber : fields[`sheetNumber.${file.fileName}`];
  if (typed !== undefined && typed.trim() !== "") {
    const parsed = parseSheetNumber(typed);
    if (parsed === null) {
      throw new AppError("bad_sheet_number", `The sheet number “${typed.slice(0, 20)}” for “${file.fileName}” is not a whole number above 0.`, 422);
    }
    return parsed;
  }
  return sheetNumberFromName(file.fileName);
}

/** Scanners work between 50 and 4800 dpi; outside that the number is a typing error, not a resolution. */
export const SCAN_DPI_RANGE = { min: 50, max: 4800 } as const;

/** The resolution typed for the upload, or 0 (take it from the file) when none was given. */
function parseDeclaredDpi(text: string | undefined): number {
  if (text === undefined || text.trim() === "") return 0;
  const value = /^\d{1,5}$/.test(text.trim()) ? Number(text.trim()) : NaN;
  if (!(value >= SCAN_DPI_RANGE.min && value <= SCAN_DPI_RANGE.max)) {
    throw new AppError("bad_dpi", `The resolution “${text.slice(0, 20)}” is not a whole number of dpi from ${SCAN_DPI_RANGE.min} to ${SCAN_DPI_RANGE.max}.`, 422);
  }
  return value;
}

/**
 * A sheet number is unique in a run (the artwork revision's scans): a new file with a number the run already has,
 * or two files of one upload with the same number, refuse the whole upload (nothing is stored). The same file sent
 * again is not a repeat of a number; it is recognised as already uploaded.
 */
async function refuseRepeatedSheetNumbers(tx: Tx, revisionId: number, files: ReceivedFile[], numbers: (number | null)[], knownSha256: string[]) {
  const fresh = files.map((file, i) => ({ file, number: numbers[i] })).filter((f) => f.number !== null && !knownSha256.includes(f.file.sha256));
  const byNumber = new Map<number, ReceivedFile>();
  for (const { file, number } of fresh) {
    const other = byNumber.get(number!);
    if (other && other.sha256 !== file.sha256) {
      throw new AppError(
        "repeated_sheet_number",
        `“${other.fileName}” and “${file.fileName}” both carry sheet number ${number}; a sheet number is unique in a press run. Nothing was stored: correct the number and upload again.`,
        422,
      );
    }
    byNumber.set(number!, file);
  }
  if (byNumber.size === 0) return;
  const taken = await tx
    .select({ sheetNumber: scans.sheetNumber, fileName: scans.originalFilename, at: scans.createdAt })
    .from(scans)
    .where(and(eq(scans.artworkRevisionId, revisionId), inArray(scans.sheetNumber, [...byNumber.keys()])))
    .limit(1);
  if (taken.length > 0) throw repeatedSheet(taken[0].sheetNumber!, byNumber.get(taken[0].sheetNumber!)!.fileName, taken[0].fileName, taken[0].at);
}

const describeError = (error: unknown): string => (error instanceof Error ? `${error.message} ${describeError(error.cause)}` : "");

const repeatedSheet = (sheetNumber: number, fileName: string, earlierFile: string, at: Date) =>
  new AppError(
    "repeated_sheet_number",
    `“${fileName}” repeats sheet ${sheetNumber}, already in this press run as “${earlierFile}” (uploaded ${at.toISOString().slice(0, 16).replace("T", " ")} UTC). ` +
      "A sheet number is unique in a run. Nothing was stored: check the number printed on the sheet and upload again.",
    409,
  );

/** Streams one or more scans into storage; a scan already uploaded to this job is recognised and not stored twice. */
export async function uploadScans(actor: Actor, jobId: number, request: Request): Promise<{ items: ScanUploadItem[] }> {
  const job = await loadJobFor(actor, jobId, "scan.upload");
  const revision = await currentApprovedRevision(job.id);
  if (!revision) throw conflict("no_approved_artwork", "This job has no approved artwork yet. Prepress must approve a revision before sheets can be inspected.");
  const upload = await receiveUpload(request, {
    kind: "scan",
    maxBytes: env.SCAN_MAX_BYTES,
    maxPixels: env.SCAN_MAX_MEGAPIXELS * 1e6,
    maxFiles: env.UPLOAD_MAX_FILES,
    keyFor: (type) => keys.scan(newObjectId(), type as ScanFormat),
  });
  const queued: number[] = [];
  try {
    const single = upload.files.length === 1;
    const numbers = upload.files.map((f) => sheetNumberFor(f, upload.fields, single));
    const profile = await chooseProfile(upload.fields.profile || undefined, job.toleranceProfileId);
    const declaredDpi = parseDeclaredDpi(upload.fields.dpi);
    const items = await db.transaction(async (tx) => {
      const known = await tx
        .select({ id: scans.id, sha256: scans.sha256, sheetNumber: scans.sheetNumber })
        .from(scans)
        .where(and(eq(scans.jobId, job.id), inArray(scans.sha256, upload.files.map((f) => f.sha256))));
      await refuseRepeatedSheetNumbers(tx, revision.id, upload.files, numbers, known.map((k) => k.sha256));
      const out: ScanUploadItem[] = [];
      const seen = new Map<string, number>();
      for (const [i, file] of upload.files.entries()) {
        const before = known.find((k) => k.sha256 === file.sha256);
        const repeatInRequest = seen.get(file.sha256);
        if (before || repeatInRequest !== undefined) {
          const scanId = before?.id ?? repeatInRequest!;
          const sheet = before ? before.sheetNumber : numbers[i];
          out.push({
            fileName: file.fileName,
            duplicate: true,
            scanId,
            inspectionId: null,
            sheetNumber: sheet,
            message: `Already uploaded${sheet ? ` as sheet ${sheet}` : ""}: the same file was not stored again.`,
          });
          continue;
        }
        const [{ id: scanId }] = await tx
          .insert(scans)
          .values({
            jobId: job.id,
            artworkRevisionId: revision.id,
            sheetNumber: numbers[i],
            objectKey: file.key,
            sha256: file.sha256,
            // 0 = take the resolution from the file when it is decoded; the worker writes the value it used.
            dpi: declaredDpi,
            byteSize: file.bytes,
            originalFilename: file.fileName,
            contentType: file.contentType,
            uploadedBy: actor.id,
          })
          .$returningId()
          .catch((error: unknown) => {
            // Another upload took the number between our check and this insert.
            if (isDuplicateKey(error) && numbers[i] !== null && /scans_revision_sheet_uq/.test(describeError(error))) throw repeatedSheet(numbers[i]!, file.fileName, "another upload", new Date());
            throw error;
          });
        seen.set(file.sha256, scanId);
        const [{ id: inspectionId }] = await tx
          .insert(inspections)
          .values({ scanId, artworkRevisionId: revision.id, toleranceProfileId: profile.id, status: "queued", stage: "queued" })
          .$returningId();
        await recordAudit(tx, {
          actorId: actor.id,
          action: "scan.upload",
          subjectType: "scan",
          subjectId: scanId,
          details: { jobId: job.id, sheetNumber: numbers[i], sha256: file.sha256, bytes: file.bytes, inspectionId },
        });
        queued.push(inspectionId);
        out.push({
          fileName: file.fileName,
          duplicate: false,
          scanId,
          inspectionId,
          sheetNumber: numbers[i],
          message: numbers[i] ? `Stored as sheet ${numbers[i]}; inspection queued.` : "Stored without a sheet number; inspection queued.",
        });
      }
      return out;
    });
    // Objects of repeated files are removed; their rows already exist. items[i] describes files[i].
    await upload.discard(upload.files.filter((_, i) => items[i].duplicate));
    for (const id of queued) {
      await enqueueInspection(id).catch((error) => console.error(`Queueing inspection ${id} failed; the worker sweep will queue it:`, error));
    }
    return { items };
  } catch (error) {
    await upload.discard();
    throw error;
  }
}
