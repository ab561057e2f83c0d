import { createHash, randomBytes } from "node:crypto";
import { createReadStream, createWriteStream, mkdirSync } from "node:fs";
import { link, mkdir, readdir, rm, stat, utimes } from "node:fs/promises";
import { dirname, join } from "node:path";
import { Readable, Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import { createGunzip, createGzip } from "node:zlib";
import { s3BlobStore } from "./s3-store.server";

/**
 * Where raw drive logs are kept, so any of them can be analysed again. Files are keyed by the
 * SHA-256 of their raw (uncompressed) bytes: the same file uploaded twice has the same key.
 * The local folder is the default; an S3-compatible bucket is the other implementation
 * (s3-store.server.ts, docs/s3-storage.md).
 */
export interface BlobStore {
  /**
   * Streams `source` into the store, compressed. Never holds the whole file in memory. A file
   * already there is kept and marked modified now, so a sweep's grace period starts again.
   */
  put(source: Readable, options?: { maxBytes?: number }): Promise<StoredBlob>;
  /** The raw (decompressed) bytes of a stored file. */
  read(key: string): Readable;
  has(key: string): Promise<boolean>;
  /**
   * Deletes a stored file; with `ifNotModifiedAfter`, only when nothing wrote or re-put it
   * after that moment (checked just before deleting), and with `ifVersion` (a put's `version`)
   * only when it is still what that put left. True when a file was removed; a missing file is
   * no error.
   */
  remove(
    key: string,
    options?: { ifNotModifiedAfter?: Date; ifVersion?: string },
  ): Promise<boolean>;
  /**
   * Stored files (`blobs`, name = key) or parts of writes in progress or abandoned (`parts`),
   * for the sweep. On S3 these are a listing by prefix and the open multipart uploads, both
   * with their last-modified time.
   */
  list(area: "blobs" | "parts"): AsyncIterable<StoreEntry>;
  /** Deletes a part when it was not written to after `ifNotModifiedAfter`. */
  removePart(name: string, options: { ifNotModifiedAfter: Date }): Promise<boolean>;
}

export interface StoreEntry {
  name: string;
  /** Bytes on disk. */
  bytes: number;
  modifiedAt: Date;
}

export interface StoredBlob {
  /** Lower-case hex SHA-256 of the raw bytes. */
  key: string;
  /** Raw size in bytes. */
  sizeBytes: number;
  /** Size on disk (gzip) in bytes. */
  storedBytes: number;
  /** True when this put wrote the file; false when the same content was there already. */
  created: boolean;
  /** The stored file's last-modified time just after this put. */
  modifiedAt: Date;
  /**
   * What this put left in the store, where times are too coarse to tell two puts apart (S3's
   * LastModified has whole seconds): `remove(key, { ifVersion })` then removes the file only if
   * no later put of the same content replaced it. Absent for the local folder (its times are
   * fine enough).
   */
  version?: string;
}

export class BlobTooLargeError extends Error {
  override name = "BlobTooLargeError";
  constructor(readonly maxBytes: number) {
    super(`the file is larger than the limit of ${formatBytes(maxBytes)}`);
  }
}

/**
 * Which store, as plain data: what crosses to a worker thread (a BlobStore object cannot) and
 * is opened there with blobStoreFrom(). A new kind of store (S3) adds a variant here and a case
 * in blobStoreFrom; its readers do not change.
 */
export type BlobStoreDescription =
  | { kind: "local"; root: string }
  // Credentials are not in it: the SDK reads them from the environment, which workers share.
  | { kind: "s3"; endpoint?: string; bucket: string; region: string; prefix?: string };

/** Opens the store a description names. */
export function blobStoreFrom(description: BlobStoreDescription): BlobStore {
  switch (description.kind) {
    case "local":
      return localBlobStore(description.root);
    case "s3": {
      // One client (and its connection pool) per bucket in each process or worker thread, not
      // one per analysis.
      const id = JSON.stringify(description);
      const store = s3Stores.get(id) ?? s3BlobStore(description);
      s3Stores.set(id, store);
      return store;
    }
  }
}
const s3Stores = new Map<string, BlobStore>();

const keyPattern = /^[0-9a-f]{64}$/;

/** Bytes per call into zlib, both ways (see put and read). */
export const ZLIB_PIECE = 1 << 20;

/**
 * What every store's put sends the raw bytes through before the compressor: it counts them
 * (BlobTooLargeError past `maxBytes`), hashes them into the key, and hands them on in pieces of
 * ZLIB_PIECE bytes, not the upload's 16–64 kB chunks: each piece is one call into zlib on the
 * thread pool, and on a 91 MB drive log 1 MiB pieces took 1.1 s against 1.5–1.8 s for the small
 * ones (docs/performance.md).
 */
export function rawMeter(maxBytes: number | undefined) {
  const hash = createHash("sha256");
  let sizeBytes = 0;
  let held: Buffer[] = [];
  let heldBytes = 0;
  const stream = new Transform({
    transform(chunk: Buffer, _enc, done) {
      sizeBytes += chunk.length;
      if (maxBytes !== undefined && sizeBytes > maxBytes) {
        done(new BlobTooLargeError(maxBytes));
        return;
      }
      hash.update(chunk);
      held.push(chunk);
      heldBytes += chunk.length;
      if (heldBytes < ZLIB_PIECE) return done();
      const piece = Buffer.concat(held, heldBytes);
      held = [];
      heldBytes = 0;
      done(null, piece);
    },
    flush(done) {
      done(null, heldBytes > 0 ? Buffer.concat(held, heldBytes) : undefined);
    },
  });
  /** The key (lower-case hex SHA-256 of the raw bytes) and the raw size, once the stream ended. */
  return { stream, key: () => hash.digest("hex"), bytes: () => sizeBytes };
}

/** A folder of gzip files, two directory levels deep by key prefix. */
export function localBlobStore(root: string): BlobStore {
  const tmpDir = join(root, "tmp");
  mkdirSync(tmpDir, { recursive: true });
  const pathOf = (key: string) => {
    if (!keyPattern.test(key)) throw new Error(`not a storage key: ${key}`);
    return join(root, key.slice(0, 2), key.slice(2, 4), `${key}.gz`);
  };

  return {
    async put(source, options = {}) {
      // The pipeline is attached before the first await: a source that fails at once (the
      // upload's content check) must find its error listener already there.
      const tmp = join(tmpDir, randomBytes(12).toString("hex"));
      const meter = rawMeter(options.maxBytes);
      // Level 1: measured on a 30 MB drive log, 94 MB/s for a ratio of 2.65, against 19 MB/s
      // and 3.09 at gzip's default 6 — the upload would wait for the compressor.
      const sink = createWriteStream(tmp);
      // The file is opened asynchronously: a source that fails at once rejects the pipeline
      // before the open is done, and removing tmp then would leave the file the open creates
      // afterwards (seen as an orphan in tmp/ after a refused upload). So tmp is removed only
      // once the sink has closed, which a destroyed write stream always reports.
      const closed = new Promise<void>((resolve) => sink.once("close", () => resolve()));
      const written = pipeline(
        source,
        meter.stream,
        createGzip({ level: 1, chunkSize: ZLIB_PIECE }),
        sink,
      );
      try {
        await written;
        const key = meter.key();
        const target = pathOf(key);
        await mkdir(dirname(target), { recursive: true });
        // link, not rename: it fails when the file exists, so `created` says for sure whether
        // this put made it (a refused upload removes only a file it made).
        let created = true;
        try {
          await link(tmp, target);
        } catch (error) {
          if ((error as NodeJS.ErrnoException).code !== "EEXIST") throw error;
          created = false;
          // Same content already stored: keep it, and mark it fresh so no sweep takes it
          // while this upload records its drive log.
          const now = new Date();
          await utimes(target, now, now);
        }
        const { size, mtime } = await stat(target);
        return { key, sizeBytes: meter.bytes(), storedBytes: size, created, modifiedAt: mtime };
      } finally {
        await closed;
        await rm(tmp, { force: true });
      }
    },

    read(key) {
      // 1 MiB reads and output pieces: on a 91 MB drive log 0.25 s to inflate, against 0.95 s
      // with zlib's default 16 kB pieces.
      const gunzip = createGunzip({ chunkSize: ZLIB_PIECE });
      const file = createReadStream(pathOf(key), { highWaterMark: ZLIB_PIECE });
      file.on("error", (error) => gunzip.destroy(error));
      return file.pipe(gunzip);
    },

    async has(key) {
      try {
        await stat(pathOf(key));
        return true;
      } catch {
        return false;
      }
    },

    async remove(key, options = {}) {
      return removeIfOld(pathOf(key), options.ifNotModifiedAfter);
    },

    async *list(area) {
      if (area === "parts") {
        for (const name of await readdir(tmpDir)) {
          const entry = await entryOf(join(tmpDir, name), name);
          if (entry) yield entry;
        }
        return;
      }
      for (const a of await readdir(root)) {
        if (!/^[0-9a-f]{2}$/.test(a)) continue; // tmp/ and anything not ours
        for (const b of await readdir(join(root, a)).catch(() => [])) {
          for (const file of await readdir(join(root, a, b)).catch(() => [])) {
            const key = file.replace(/\.gz$/, "");
            if (!keyPattern.test(key) || pathOf(key) !== join(root, a, b, file)) continue;
            const entry = await entryOf(join(root, a, b, file), key);
            if (entry) yield entry;
          }
        }
      }
    },

    async removePart(name, options) {
      if (!/^[0-9a-f]+$/.test(name)) throw new Error(`not a part name: ${name}`);
      return removeIfOld(join(tmpDir, name), options.ifNotModifiedAfter);
    },
  };
}

async function entryOf(path: string, name: string): Promise<StoreEntry | null> {
  try {
    const { size, mtime } = await stat(path);
    return { name, bytes: size, modifiedAt: mtime };
  } catch {
    return null; // removed meanwhile
  }
}

/** rm, or with `limit` only when the file was last modified at or before it. */
async function removeIfOld(path: string, limit: Date | undefined): Promise<boolean> {
  const found = await stat(path).catch(() => null);
  if (!found || (limit && found.mtime.getTime() > limit.getTime())) return false;
  await rm(path, { force: true });
  return true;
}

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 ** 3)
    return `${(bytes / 1024 ** 3).toFixed(bytes % 1024 ** 3 === 0 ? 0 : 1)} GB`;
  if (bytes >= 1024 ** 2)
    return `${(bytes / 1024 ** 2).toFixed(bytes % 1024 ** 2 === 0 ? 0 : 1)} MB`;
  if (bytes >= 1024) return `${Math.round(bytes / 1024)} kB`;
  return `${bytes} B`;
}

/** Reads a stored blob back into one string (small files and tests only). */
export async function readAllText(store: BlobStore, key: string): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of store.read(key)) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks).toString("utf8");
}
