// Receives a multipart upload from a route handler's Request and streams each file straight into storage:
// Request body → formidable → FileGate (limits, type) → sha256 → S3 multipart upload. No file is held whole in
// memory or written to local disk. All or nothing per request: when any file is refused or the connection
// breaks, every object of the request is removed again before the error is returned.
import { Readable } from "node:stream";
import formidable from "formidable";
import { AppError } from "@/lib/errors";
import { startPut, deleteObject, type StoredObject } from "@/storage/objects";
import { FileGate, type GateLimits } from "./file-gate";
import { contentTypes, type DetectedType, type UploadKind } from "./file-types";

export interface ReceivedFile extends StoredObject {
  field: string;
  /** The browser's file name: shown to people and read for a sheet number, never used as a storage key. */
  fileName: string;
  type: DetectedType;
  contentType: string;
}

export interface ReceiveOptions extends GateLimits {
  kind: UploadKind;
  maxFiles: number;
  /** Storage key for a new file of the detected type (random id, see storage/keys.ts). */
  keyFor: (type: DetectedType) => string;
}

export interface ReceivedUpload {
  fields: Record<string, string>;
  files: ReceivedFile[];
  /** Remove every stored object of this upload (the caller's database write failed or the file was a repeat). */
  discard: (files?: ReceivedFile[]) => Promise<void>;
}

interface Pending {
  field: string;
  fileName: string;
  gate: FileGate;
  put?: ReturnType<typeof startPut>;
  error?: unknown;
}

/** formidable reads a Node request: give it the web body as a stream carrying the headers it looks at. */
function asNodeRequest(request: Request) {
  if (!request.body) throw new AppError("no_files", "The upload was empty: choose at least one file.", 400);
  const stream = Readable.fromWeb(request.body as import("node:stream/web").ReadableStream) as Readable & {
    headers: Record<string, string>;
  };
  const headers = Object.fromEntries(request.headers);
  // Without a length formidable reads nothing; a Request built from FormData has none until it is sent.
  if (!headers["content-length"] && !headers["transfer-encoding"]) headers["transfer-encoding"] = "chunked";
  stream.headers = headers;
  return stream;
}

const isStorageFailure = (e: unknown) =>
  typeof e === "object" &&
  e !== null &&
  ("$metadata" in e || /ECONNREFUSED|ECONNRESET|ETIMEDOUT|EPIPE|socket hang up/i.test(`${(e as { code?: string }).code} ${(e as Error).message}`));

/** The error to report: our own refusal first, then a storage outage, else a broken connection. */
function firstError(pending: Pending[], fallback: unknown): AppError {
  const all = [...pending.map((p) => p.error), fallback].filter(Boolean);
  const ours = all.find((e) => e instanceof AppError);
  if (ours) return ours as AppError;
  if ((fallback as { httpCode?: number })?.httpCode === 413) {
    return new AppError("file_too_large", "The upload is larger than allowed.", 413);
  }
  if ((fallback as { code?: number })?.code === 1015) {
    return new AppError("too_many_files", "Too many files in one upload.", 413);
  }
  if (all.some(isStorageFailure)) {
    return new AppError(
      "storage_unavailable",
      "File storage is not reachable right now, so nothing was saved. Please try again in a few minutes.",
      503,
    );
  }
  return new AppError("upload_interrupted", "The upload was interrupted before it finished; nothing was saved. Please try again.", 400);
}

export async function receiveUpload(request: Request, options: ReceiveOptions): Promise<ReceivedUpload> {
  const contentType = request.headers.get("content-type") ?? "";
  if (!contentType.startsWith("multipart/form-data")) {
    throw new AppError("not_multipart", "Send the files as a multipart form (multipart/form-data).", 400);
  }
  const pending: Pending[] = [];
  // formidable ignores a file stream's error that comes after the last boundary was read (a refusal at the
  // file's end, a storage failure on the final part): settle the request on the first failure ourselves.
  let fail: (error: unknown) => void = () => undefined;
  const failed = new Promise<never>((_, reject) => (fail = reject));
  failed.catch(() => undefined);
  const form = formidable({
    maxFiles: options.maxFiles,
    // The gate enforces the per-file limit as bytes arrive; formidable's own check only runs at a file's end.
    maxFileSize: options.maxBytes + 1,
    maxTotalFileSize: (options.maxBytes + 1) * options.maxFiles,
    allowEmptyFiles: true,
    minFileSize: 0,
    maxFields: 200,
    maxFieldsSize: 1024 * 1024,
    fileWriteStreamHandler: (file) => {
      const volatile = file as unknown as { originalFilename?: string | null; __field?: string };
      const fileName = (volatile?.originalFilename ?? "unnamed file").slice(0, 255);
      const entry: Pending = { field: "", fileName, gate: new FileGate(options.kind, fileName, options) };
      pending.push(entry);
      let started = false;
      entry.gate.on("data", (chunk: Buffer) => {
        // The key depends on the detected type, known only once the first bytes have passed the gate.
        if (!started) {
          started = true;
          const type = entry.gate.type as DetectedType;
          entry.put = startPut(options.keyFor(type), contentTypes[type]);
          // A storage failure must stop formidable too, or it would wait on a stream nobody reads.
          entry.put.done.catch((error) => {
            entry.error ??= error;
            entry.gate.destroy(error);
            fail(error);
          });
        }
        if (!entry.put!.input.write(chunk)) {
          entry.gate.pause();
          entry.put!.input.once("drain", () => entry.gate.resume());
        }
      });
      entry.gate.on("end", () => entry.put?.input.end());
      entry.gate.on("error", (error) => {
        entry.error ??= error;
        fail(error);
      });
      return entry.gate;
    },
  });
  form.on("fileBegin", (field: string) => {
    // fileBegin fires right after the write stream was made for this file: label the newest entry.
    const last = pending.at(-1);
    if (last && !last.field) last.field = field;
  });

  const cancelAll = async () => {
    await Promise.all(pending.map((p) => p.put?.cancel()));
  };

  const body = asNodeRequest(request);
  try {
    const [fields] = await Promise.race([form.parse(body as never), failed]);
    const stored = await Promise.race([Promise.all(pending.map((p) => p.put?.done)), failed]);
    const files = pending.map((p, i): ReceivedFile => {
      if (!stored[i]) throw p.error ?? new AppError("empty_file", `“${p.fileName}” is empty.`, 400);
      return { ...stored[i]!, field: p.field, fileName: p.fileName, type: p.gate.type!, contentType: contentTypes[p.gate.type!] };
    });
    if (files.length === 0) throw new AppError("no_files", "No file arrived: choose at least one file.", 400);
    const flat = Object.fromEntries(Object.entries(fields).map(([k, v]) => [k, String(v?.[0] ?? "")]));
    return {
      fields: flat,
      files,
      discard: async (some = files) => {
        await Promise.all(some.map((f) => deleteObject(f.key).catch(() => undefined)));
      },
    };
  } catch (error) {
    // Read the rest of the body into nothing, so the response can go out on a healthy connection
    // (destroying a web stream that has just closed throws on Node 20).
    body.resume();
    await cancelAll();
    throw firstError(pending, error);
  }
}
