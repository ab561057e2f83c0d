/**
 * The local stand-in for S3-compatible object storage: s3rver (npm) on 127.0.0.1 with one
 * bucket, plus the four S3 calls s3rver 3.7.1 lacks or gets wrong and the S3 blob store needs
 * (docs/s3-storage.md, "The stand-in"). Credentials: s3rver accepts the access key S3RVER with
 * the secret S3RVER (AWS_ACCESS_KEY_ID=S3RVER AWS_SECRET_ACCESS_KEY=S3RVER).
 *
 *   npx tsx scripts/s3-stand-in.ts --port 4569 --dir .data/s3 --bucket twistlog
 *
 * What s3rver does itself (node_modules/s3rver/lib/routes.js, stores/filesystem.js) and what is
 * added here, as answers of the S3 API reference (docs.aws.amazon.com/AmazonS3/latest/API/):
 * - ListMultipartUploads (GET /bucket?uploads): s3rver answers NotImplemented. Added over
 *   s3rver's own upload folder (<dir>/<bucket>/._S3rver_uploads/<uploadId>/{key,1,2,…}).
 * - ListParts (GET /bucket/key?uploadId=…): s3rver answers MethodNotAllowed. Added likewise.
 * - AbortMultipartUpload (DELETE /bucket/key?uploadId=…): s3rver answers MethodNotAllowed and
 *   keeps the parts. Added: removes the upload's folder.
 * - CopyObject onto itself with MetadataDirective REPLACE: s3rver rewrites the metadata but
 *   keeps the file's time, so LastModified stays old; S3 gives the copy a new LastModified.
 *   Added: the object's time is set to now after s3rver's copy.
 * Requests for these pass s3rver's own signature check first.
 */
import { readdir, readFile, rm, stat, utimes } from "node:fs/promises";
import { createRequire } from "node:module";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { parseArgs } from "node:util";

const require = createRequire(import.meta.url);
type Ctx = {
  method: string;
  path: string;
  query: Record<string, string | undefined>;
  headers: Record<string, string | undefined>;
  params: Record<string, string>;
  status: number;
  body: unknown;
};
type Next = () => Promise<void>;
type Middleware = (ctx: Ctx, next: Next) => Promise<void>;
type S3rverApp = {
  middleware: Middleware[];
  run(): Promise<{ address: string; port: number }>;
  close(): Promise<void>;
};
const S3rver = require("s3rver") as new (options: object) => S3rverApp;
const authentication = require("s3rver/lib/middleware/authentication") as () => Middleware;
const S3Error = require("s3rver/lib/models/error") as new (code: string, message: string) => Error;

export interface S3StandIn {
  endpoint: string;
  stop(): Promise<void>;
}

/** Starts s3rver with `bucket` (created when missing) and the added calls; resolves when listening. */
export async function startS3StandIn(options: {
  port: number;
  dir: string;
  bucket: string;
}): Promise<S3StandIn> {
  const server = new S3rver({
    address: "127.0.0.1",
    port: options.port,
    directory: options.dir,
    silent: true,
    configureBuckets: [{ name: options.bucket }],
  });
  // s3rver is a Koa app: [logger, XML answers, mount path, virtual hosts, router]. The added
  // calls go just before its router, so their plain-object bodies become XML as s3rver's do.
  server.middleware.splice(server.middleware.length - 1, 0, fillGaps(options.dir));
  const { port } = await server.run();
  return { endpoint: `http://127.0.0.1:${port}`, stop: () => server.close() };
}

function fillGaps(dir: string): Middleware {
  const auth = authentication();
  return async (ctx, next) => {
    const match = /^\/([^/]+)(?:\/(.*))?$/.exec(ctx.path);
    if (!match) return next();
    const bucket = match[1]!;
    const key = match[2] && decodeURIComponent(match[2]);
    const uploads = join(dir, bucket, "._S3rver_uploads");
    const uploadId = ctx.query.uploadId;
    const signed = (answer: () => Promise<void>) => {
      ctx.params = key ? { bucket, key } : { bucket };
      return auth(ctx, answer);
    };
    if (ctx.method === "GET" && !key && "uploads" in ctx.query)
      return signed(() => listUploads(ctx, bucket, uploads));
    if (key && uploadId && (ctx.method === "GET" || ctx.method === "DELETE")) {
      return signed(async () => {
        const folder = join(uploads, uploadId);
        const owner = /^[0-9a-f]+$/.test(uploadId)
          ? await readFile(join(folder, "key"), "utf8").catch(() => null)
          : null;
        if (owner !== key)
          throw new S3Error("NoSuchUpload", "The specified upload does not exist.");
        if (ctx.method === "DELETE") {
          await rm(folder, { recursive: true, force: true });
          ctx.status = 204;
          return;
        }
        ctx.body = await listParts(bucket, key, uploadId, folder);
      });
    }
    await next();
    const source = ctx.headers["x-amz-copy-source"];
    if (
      ctx.method === "PUT" &&
      key &&
      source &&
      ctx.status === 200 &&
      ctx.headers["x-amz-metadata-directive"] === "REPLACE" &&
      decodeURIComponent(source).replace(/^\//, "") === `${bucket}/${key}`
    ) {
      const now = new Date();
      const parts = key.split("/");
      const last = parts.pop()!;
      await utimes(join(dir, bucket, ...parts, `${last}._S3rver_object`), now, now);
    }
  };
}

/** ListMultipartUploads: prefix, key-marker/upload-id-marker and max-uploads, key order. */
async function listUploads(ctx: Ctx, bucket: string, uploads: string) {
  const prefix = ctx.query.prefix ?? "";
  const max = Math.min(1000, Number(ctx.query["max-uploads"] ?? 1000));
  const keyMarker = ctx.query["key-marker"] ?? "";
  const idMarker = ctx.query["upload-id-marker"] ?? "";
  const found: { key: string; id: string; initiated: Date }[] = [];
  for (const id of await readdir(uploads).catch(() => [] as string[])) {
    const keyFile = join(uploads, id, "key");
    const [key, info] = await Promise.all([
      readFile(keyFile, "utf8").catch(() => null),
      stat(keyFile).catch(() => null),
    ]);
    if (key === null || !info || !key.startsWith(prefix)) continue;
    if (key < keyMarker || (key === keyMarker && (!idMarker || id <= idMarker))) continue;
    found.push({ key, id, initiated: info.mtime });
  }
  found.sort((a, b) => (a.key === b.key ? (a.id < b.id ? -1 : 1) : a.key < b.key ? -1 : 1));
  const page = found.slice(0, max);
  const truncated = found.length > page.length;
  ctx.body = {
    ListMultipartUploadsResult: {
      "@": { xmlns: "http://s3.amazonaws.com/doc/2006-03-01/" },
      Bucket: bucket,
      KeyMarker: keyMarker,
      UploadIdMarker: idMarker,
      ...(truncated && {
        NextKeyMarker: page.at(-1)!.key,
        NextUploadIdMarker: page.at(-1)!.id,
      }),
      Prefix: prefix,
      MaxUploads: max,
      IsTruncated: truncated,
      Upload: page.map((u) => ({
        Key: u.key,
        UploadId: u.id,
        Initiator: { ID: "123456789000", DisplayName: "S3rver" },
        Owner: { ID: "123456789000", DisplayName: "S3rver" },
        StorageClass: "STANDARD",
        Initiated: u.initiated.toISOString(),
      })),
    },
  };
}

/** ListParts: every stored part (s3rver keeps `<n>` and `<n>.md5`), number order, one page. */
async function listParts(bucket: string, key: string, uploadId: string, folder: string) {
  const numbers = (await readdir(folder))
    .filter((f) => /^\d+$/.test(f))
    .map(Number)
    .sort((a, b) => a - b);
  const parts = await Promise.all(
    numbers.map(async (n) => {
      const [info, md5] = await Promise.all([
        stat(join(folder, `${n}`)),
        readFile(join(folder, `${n}.md5`), "utf8").catch(() => ""),
      ]);
      return {
        PartNumber: n,
        LastModified: info.mtime.toISOString(),
        ETag: `"${md5}"`,
        Size: info.size,
      };
    }),
  );
  return {
    ListPartsResult: {
      "@": { xmlns: "http://s3.amazonaws.com/doc/2006-03-01/" },
      Bucket: bucket,
      Key: key,
      UploadId: uploadId,
      StorageClass: "STANDARD",
      MaxParts: 1000,
      IsTruncated: false,
      Part: parts,
    },
  };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const { values } = parseArgs({
    options: {
      port: { type: "string", default: "4569" },
      dir: { type: "string", default: ".data/s3" },
      bucket: { type: "string", default: "twistlog" },
    },
  });
  const standIn = await startS3StandIn({
    port: Number(values.port),
    dir: values.dir,
    bucket: values.bucket,
  });
  console.log(
    `s3 stand-in: bucket ${values.bucket} at ${standIn.endpoint} (files in ${values.dir})`,
  );
  const stop = () => void standIn.stop().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}
