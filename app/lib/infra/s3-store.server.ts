import { randomBytes } from "node:crypto";
import { PassThrough, Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { createGunzip, createGzip } from "node:zlib";
import {
  AbortMultipartUploadCommand,
  CopyObjectCommand,
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  ListMultipartUploadsCommand,
  ListObjectsV2Command,
  ListPartsCommand,
  S3Client,
} from "@aws-sdk/client-s3";
import { Upload } from "@aws-sdk/lib-storage";
import { rawMeter, ZLIB_PIECE, type BlobStore, type StoreEntry } from "./storage.server";

/**
 * The BlobStore in an S3-compatible bucket (docs/s3-storage.md). Same stored format as the
 * local folder: gzip (level 1) of the raw bytes, keyed by their lower-case hex SHA-256, under
 * `<prefix>blobs/<aa>/<bb>/<key>.gz`. A put streams through a multipart upload to a temporary
 * object `<prefix>parts/<random hex>`, then copies it to its key inside the bucket (no second
 * transfer) once the hash is known. Credentials come from the SDK's default chain (e.g.
 * AWS_ACCESS_KEY_ID / AWS_SECRET_ACCESS_KEY), never from the description.
 */
export interface S3StoreOptions {
  bucket: string;
  region: string;
  /** An S3-compatible service (e.g. the stand-in); path-style addressing then. */
  endpoint?: string;
  /** Put before every object key, e.g. "twistlog/". */
  prefix?: string;
}

const keyPattern = /^[0-9a-f]{64}$/;
/** Part size and parts in flight: at most about (2 + 1) × 8 MiB held per put. */
const PART_BYTES = 8 * 1024 * 1024;
const QUEUE = 2;

export function s3BlobStore(options: S3StoreOptions): BlobStore {
  const client = new S3Client({
    region: options.region,
    ...(options.endpoint && { endpoint: options.endpoint, forcePathStyle: true }),
  });
  const Bucket = options.bucket;
  const prefix = options.prefix ?? "";
  const objectOf = (key: string) => {
    if (!keyPattern.test(key)) throw new Error(`not a storage key: ${key}`);
    return `${prefix}blobs/${key.slice(0, 2)}/${key.slice(2, 4)}/${key}.gz`;
  };
  const head = (Key: string) =>
    client.send(new HeadObjectCommand({ Bucket, Key })).catch((error) => {
      if (notFound(error)) return null;
      throw error;
    });

  return {
    async put(source, opts = {}) {
      const meter = rawMeter(opts.maxBytes);
      const gzip = createGzip({ level: 1, chunkSize: ZLIB_PIECE });
      // Attached before the first await, like the local store: a source that fails at once must
      // find its error listener there. A failure anywhere destroys gzip, which fails the upload's
      // read of it; lib-storage then aborts the multipart upload before done() rejects.
      const compressed = pipeline(source, meter.stream, gzip);
      compressed.catch(() => {});
      const temp = `${prefix}parts/${randomBytes(12).toString("hex")}`;
      const upload = new Upload({
        client,
        params: { Bucket, Key: temp, Body: gzip, ContentType: "application/gzip" },
        partSize: PART_BYTES,
        queueSize: QUEUE,
        leavePartsOnError: false,
      });
      try {
        await upload.done();
        await compressed;
        const key = meter.key();
        const Key = objectOf(key);
        const created = !(await head(Key));
        const version = randomBytes(8).toString("hex");
        // Onto itself with REPLACE for content already there: S3's way to give it a new
        // LastModified (a plain self-copy is refused), so a sweep's grace period starts again.
        await client.send(
          new CopyObjectCommand({
            Bucket,
            Key,
            CopySource: `${Bucket}/${created ? temp : Key}`,
            MetadataDirective: "REPLACE",
            ContentType: "application/gzip",
            Metadata: { put: version },
          }),
        );
        const stored = await head(Key);
        if (!stored) throw new Error(`stored file ${key} vanished just after its copy`);
        return {
          key,
          sizeBytes: meter.bytes(),
          storedBytes: stored.ContentLength ?? 0,
          created,
          modifiedAt: stored.LastModified ?? new Date(),
          version,
        };
      } catch (error) {
        gzip.destroy();
        source.destroy();
        throw error;
      } finally {
        await client.send(new DeleteObjectCommand({ Bucket, Key: temp })).catch(() => {});
      }
    },

    read(key) {
      const Key = objectOf(key);
      const out = new PassThrough({ highWaterMark: ZLIB_PIECE });
      client
        .send(new GetObjectCommand({ Bucket, Key }))
        .then((answer) => {
          const body = answer.Body as Readable;
          return pipeline(body, createGunzip({ chunkSize: ZLIB_PIECE }), out);
        })
        .catch((error: unknown) => {
          // A missing file errors the stream as the local store's does (code ENOENT).
          const failure = notFound(error)
            ? Object.assign(new Error(`ENOENT: no stored file ${key}`), { code: "ENOENT" })
            : (error as Error);
          out.destroy(failure);
        });
      return out;
    },

    async has(key) {
      if (!keyPattern.test(key)) return false;
      return !!(await head(objectOf(key)));
    },

    async remove(key, opts = {}) {
      return removeIfOld(objectOf(key), opts.ifNotModifiedAfter, opts.ifVersion);
    },

    async *list(area) {
      if (area === "blobs") {
        for await (const o of objects(`${prefix}blobs/`)) {
          const key = /([0-9a-f]{64})\.gz$/.exec(o.Key)?.[1];
          if (key && objectOf(key) === o.Key)
            yield { name: key, bytes: o.Size, modifiedAt: o.LastModified };
        }
        return;
      }
      for await (const o of objects(`${prefix}parts/`)) {
        const id = o.Key.slice(`${prefix}parts/`.length);
        if (/^[0-9a-f]+$/.test(id))
          yield { name: `object:${id}`, bytes: o.Size, modifiedAt: o.LastModified };
      }
      for await (const u of openUploads()) yield u;
    },

    async removePart(name, opts) {
      const object = /^object:([0-9a-f]+)$/.exec(name);
      if (object) return removeIfOld(`${prefix}parts/${object[1]}`, opts.ifNotModifiedAfter);
      const upload = /^upload:([A-Za-z0-9._~-]+):([0-9a-f]+)$/.exec(name);
      if (!upload) throw new Error(`not a part name: ${name}`);
      const [, UploadId, id] = upload as unknown as [string, string, string];
      const Key = `${prefix}parts/${id}`;
      const entry = await uploadEntry(Key, UploadId, new Date(0));
      if (!entry || tooNew(entry.modifiedAt, opts.ifNotModifiedAfter)) return false;
      await client.send(new AbortMultipartUploadCommand({ Bucket, Key, UploadId }));
      return true;
    },
  };

  /**
   * DeleteObject, with `limit` only when the object was last modified at or before it, and with
   * `version` only when it is still what that put left (x-amz-meta-put).
   */
  async function removeIfOld(Key: string, limit: Date | undefined, version?: string) {
    const found = await head(Key);
    if (!found || tooNew(found.LastModified, limit)) return false;
    if (version !== undefined && found.Metadata?.put !== version) return false;
    await client.send(new DeleteObjectCommand({ Bucket, Key }));
    return true;
  }

  /** Every object under a prefix, page by page (ListObjectsV2, 1000 a page). */
  async function* objects(Prefix: string) {
    let ContinuationToken: string | undefined;
    do {
      const page = await client.send(
        new ListObjectsV2Command({ Bucket, Prefix, ContinuationToken }),
      );
      for (const o of page.Contents ?? [])
        if (o.Key && o.LastModified)
          yield { Key: o.Key, Size: o.Size ?? 0, LastModified: o.LastModified };
      ContinuationToken = page.IsTruncated ? page.NextContinuationToken : undefined;
    } while (ContinuationToken);
  }

  /** Open multipart uploads of temporary objects, each modified at its newest part. */
  async function* openUploads(): AsyncIterable<StoreEntry> {
    let KeyMarker: string | undefined;
    let UploadIdMarker: string | undefined;
    const Prefix = `${prefix}parts/`;
    do {
      const page = await client.send(
        new ListMultipartUploadsCommand({ Bucket, Prefix, KeyMarker, UploadIdMarker }),
      );
      for (const u of page.Uploads ?? []) {
        if (!u.Key || !u.UploadId) continue;
        const entry = await uploadEntry(u.Key, u.UploadId, u.Initiated ?? new Date(0));
        if (entry) yield entry;
      }
      KeyMarker = page.IsTruncated ? page.NextKeyMarker : undefined;
      UploadIdMarker = page.IsTruncated ? page.NextUploadIdMarker : undefined;
    } while (KeyMarker);
  }

  /** An open upload as a part (ListParts: its bytes and newest part), or null when gone. */
  async function uploadEntry(Key: string, UploadId: string, initiated: Date) {
    const id = Key.slice(`${prefix}parts/`.length);
    if (!/^[0-9a-f]+$/.test(id) || !/^[A-Za-z0-9._~-]+$/.test(UploadId)) return null;
    let bytes = 0;
    let modifiedAt = initiated;
    let PartNumberMarker: string | undefined;
    try {
      do {
        const page = await client.send(
          new ListPartsCommand({ Bucket, Key, UploadId, PartNumberMarker }),
        );
        for (const p of page.Parts ?? []) {
          bytes += p.Size ?? 0;
          if (p.LastModified && p.LastModified > modifiedAt) modifiedAt = p.LastModified;
        }
        PartNumberMarker = page.IsTruncated ? page.NextPartNumberMarker : undefined;
      } while (PartNumberMarker);
    } catch (error) {
      if (notFound(error)) return null;
      throw error;
    }
    return { name: `upload:${UploadId}:${id}`, bytes, modifiedAt };
  }
}

/** Modified after the limit (S3 times have whole seconds, as the limits from its own answers). */
function tooNew(modified: Date | undefined, limit: Date | undefined): boolean {
  return !!limit && !!modified && modified.getTime() > limit.getTime();
}

function notFound(error: unknown): boolean {
  const e = error as { name?: string; $metadata?: { httpStatusCode?: number } };
  return (
    e?.name === "NotFound" ||
    e?.name === "NoSuchKey" ||
    e?.name === "NoSuchUpload" ||
    e?.$metadata?.httpStatusCode === 404
  );
}
