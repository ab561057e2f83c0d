import { join } from "node:path";
import { getEnv } from "./env.server";
import { blobStoreFrom, type BlobStore, type BlobStoreDescription } from "./storage.server";

/** Where raw drive logs are kept (TWISTLOG_STORAGE_DIR, default .data/blobs). */
export function blobRoot(): string {
  return getEnv().TWISTLOG_STORAGE_DIR ?? join(process.cwd(), ".data", "blobs");
}

/** The configured store as plain data (for the analysis worker, which opens its own). */
export function blobStoreDescription(): BlobStoreDescription {
  const env = getEnv();
  if (env.STORAGE === "s3" && env.S3_BUCKET)
    return {
      kind: "s3",
      bucket: env.S3_BUCKET,
      region: env.S3_REGION,
      ...(env.S3_ENDPOINT && { endpoint: env.S3_ENDPOINT }),
    };
  return { kind: "local", root: blobRoot() };
}

let store: BlobStore | undefined;
export function blobStore(): BlobStore {
  return (store ??= blobStoreFrom(blobStoreDescription()));
}

/** The largest drive log accepted, in bytes (UPLOAD_MAX_BYTES, default 1 GiB). */
export function uploadMaxBytes(): number {
  return getEnv().UPLOAD_MAX_BYTES;
}

/** How long an unreferenced stored file or upload part is left alone (0: never swept). */
export function sweepGraceMs(): number {
  return getEnv().STORAGE_SWEEP_GRACE_SECONDS * 1000;
}
