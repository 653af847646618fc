// Streaming reads and writes of stored objects. Nothing here buffers a whole object unless the caller asks for
// a Buffer (small things: crops, rasters the worker decodes anyway).
import { createHash } from "node:crypto";
import { Readable, Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import {
  CreateBucketCommand,
  DeleteObjectCommand,
  DeleteObjectsCommand,
  GetObjectCommand,
  HeadBucketCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  NoSuchKey,
  NotFound,
  type S3Client,
} from "@aws-sdk/client-s3";
import { Upload } from "@aws-sdk/lib-storage";
import { bucket as defaultBucket, s3 as defaultClient } from "./client";

/** Parts of 8 MiB: above S3's 5 MiB minimum, and at most 4 in flight keeps memory per upload near 32 MiB. */
export const PART_SIZE = 8 * 1024 * 1024;
const QUEUE_SIZE = 4;

export interface StoredObject {
  key: string;
  bytes: number;
  sha256: string;
}

export interface Storage {
  client: S3Client;
  bucket: string;
}
const defaultStorage: Storage = { client: defaultClient, bucket: defaultBucket };

/** Counts and hashes bytes as they pass, so the digest is of exactly what was sent to storage. */
export class HashingCounter extends Transform {
  readonly hash = createHash("sha256");
  bytes = 0;
  override _transform(chunk: Buffer, _enc: BufferEncoding, done: (e?: Error | null, c?: Buffer) => void) {
    this.hash.update(chunk);
    this.bytes += chunk.length;
    done(null, chunk);
  }
}

/**
 * A put that starts now and can still be cancelled: the body is written into `input`; `done` resolves when the
 * object is safely stored. Large bodies go as a multipart upload; on any error the multipart upload is aborted
 * by lib-storage, so no parts stay behind.
 */
export function startPut(key: string, contentType: string, storage: Storage = defaultStorage) {
  const input = new HashingCounter();
  const upload = new Upload({
    client: storage.client,
    params: { Bucket: storage.bucket, Key: key, Body: input, ContentType: contentType },
    partSize: PART_SIZE,
    queueSize: QUEUE_SIZE,
    leavePartsOnError: false,
  });
  const done: Promise<StoredObject> = upload.done().then(() => ({
    key,
    bytes: input.bytes,
    sha256: input.hash.digest("hex"),
  }));
  // The caller always awaits `done` or calls cancel(); keep an early rejection from being reported as unhandled.
  done.catch(() => undefined);
  return {
    key,
    input,
    done,
    async cancel(): Promise<void> {
      // Fail the body rather than calling upload.abort(): abort() settles `done` at once while a request already
      // sent goes on and may store the object after we deleted it. A failed body lets lib-storage finish every
      // request in flight and abort the multipart upload before `done` settles; then nothing can arrive later.
      input.destroy(new Error("upload cancelled"));
      await done.catch(() => undefined);
      // A single-part put may have completed before the body failed: remove it.
      await deleteObject(key, storage).catch(() => undefined);
    },
  };
}

/** Store a stream, a Buffer or a Uint8Array; resolves with size and sha256 once stored. */
export async function putObject(
  key: string,
  body: Readable | Buffer | Uint8Array,
  contentType: string,
  storage: Storage = defaultStorage,
): Promise<StoredObject> {
  const put = startPut(key, contentType, storage);
  const source = body instanceof Readable ? body : Readable.from([Buffer.from(body)]);
  try {
    await pipeline(source, put.input);
    return await put.done;
  } catch (error) {
    await put.cancel();
    throw error;
  }
}

export async function getObjectStream(key: string, storage: Storage = defaultStorage): Promise<Readable> {
  const out = await storage.client.send(new GetObjectCommand({ Bucket: storage.bucket, Key: key }));
  if (!out.Body) throw new Error(`Stored object ${key} has no body`);
  return out.Body as Readable;
}

export async function getObjectBuffer(key: string, storage: Storage = defaultStorage): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of await getObjectStream(key, storage)) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

/** Bytes [offset, offset + length) of a stored object (a ranged GET). */
export async function getObjectRange(key: string, offset: number, length: number, storage: Storage = defaultStorage): Promise<Buffer> {
  const out = await storage.client.send(new GetObjectCommand({ Bucket: storage.bucket, Key: key, Range: `bytes=${offset}-${offset + length - 1}` }));
  if (!out.Body) throw new Error(`Stored object ${key} has no body`);
  const chunks: Buffer[] = [];
  for await (const chunk of out.Body as Readable) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

/** Size in bytes of a stored object, or null when there is none. */
export async function objectSize(key: string, storage: Storage = defaultStorage): Promise<number | null> {
  try {
    const head = await storage.client.send(new HeadObjectCommand({ Bucket: storage.bucket, Key: key }));
    return head.ContentLength ?? null;
  } catch (error) {
    if (error instanceof NotFound || error instanceof NoSuchKey) return null;
    if ((error as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode === 404) return null;
    throw error;
  }
}

export async function objectExists(key: string, storage: Storage = defaultStorage): Promise<boolean> {
  try {
    await storage.client.send(new HeadObjectCommand({ Bucket: storage.bucket, Key: key }));
    return true;
  } catch (error) {
    if (error instanceof NotFound || error instanceof NoSuchKey) return false;
    if ((error as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode === 404) return false;
    throw error;
  }
}

export async function deleteObject(key: string, storage: Storage = defaultStorage): Promise<void> {
  await storage.client.send(new DeleteObjectCommand({ Bucket: storage.bucket, Key: key }));
}

export async function listKeys(prefix: string, storage: Storage = defaultStorage): Promise<string[]> {
  const found: string[] = [];
  let token: string | undefined;
  do {
    const page = await storage.client.send(
      new ListObjectsV2Command({ Bucket: storage.bucket, Prefix: prefix, ContinuationToken: token }),
    );
    for (const item of page.Contents ?? []) if (item.Key) found.push(item.Key);
    token = page.IsTruncated ? page.NextContinuationToken : undefined;
  } while (token);
  return found;
}

/** Delete every key under `prefix` except those in `keep` (e.g. crops of an earlier run of an inspection). */
export async function deleteUnder(prefix: string, keep: ReadonlySet<string> = new Set(), storage = defaultStorage) {
  const doomed = (await listKeys(prefix, storage)).filter((k) => !keep.has(k));
  for (let i = 0; i < doomed.length; i += 1000) {
    const batch = doomed.slice(i, i + 1000).map((Key) => ({ Key }));
    await storage.client.send(new DeleteObjectsCommand({ Bucket: storage.bucket, Delete: { Objects: batch } }));
  }
  return doomed.length;
}

/** Create the bucket when missing (local fake, fresh machine). A real bucket is made by its owner. */
export async function ensureBucket(storage: Storage = defaultStorage): Promise<void> {
  try {
    await storage.client.send(new HeadBucketCommand({ Bucket: storage.bucket }));
  } catch {
    await storage.client.send(new CreateBucketCommand({ Bucket: storage.bucket }));
  }
}
