// One S3 client for the web app, the worker, scripts and tests. The same settings work against the local fake
// (s3rver) and a real S3 or MinIO bucket: only the environment changes.
import { S3Client } from "@aws-sdk/client-s3";
import { env } from "@/lib/env";

const globalForS3 = globalThis as unknown as { tympanS3?: S3Client };

export function makeS3Client(endpoint = env.S3_ENDPOINT): S3Client {
  return new S3Client({
    endpoint,
    region: env.S3_REGION,
    credentials: { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY },
    forcePathStyle: env.S3_FORCE_PATH_STYLE,
    // With the SDK's default (WHEN_SUPPORTED) a streamed PutObject reaches s3rver in aws-chunked framing that
    // it stores verbatim inside the object; WHEN_REQUIRED sends plain bodies. Checked by tests/pipeline/storage.test.ts.
    requestChecksumCalculation: env.S3_CHECKSUMS,
    responseChecksumValidation: env.S3_CHECKSUMS,
    // Fail fast when storage is down instead of retrying for a long time while a user waits.
    maxAttempts: 2,
  });
}

/** Cached on globalThis so Next's development reloads do not open a new connection pool each time. */
export const s3: S3Client = globalForS3.tympanS3 ?? (globalForS3.tympanS3 = makeS3Client());
export const bucket = env.S3_BUCKET;
