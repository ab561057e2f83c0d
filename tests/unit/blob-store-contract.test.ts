import { randomBytes } from "node:crypto";
import { mkdir, mkdtemp, readdir, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import {
  CreateMultipartUploadCommand,
  GetObjectCommand,
  ListMultipartUploadsCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  UploadPartCommand,
} from "@aws-sdk/client-s3";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { getEnv } from "~/lib/infra/env.server";
import { blobStoreFrom, localBlobStore } from "~/lib/infra/storage.server";
import { startS3StandIn, type S3StandIn } from "../../scripts/s3-stand-in";
import { blobStoreContract } from "../support/blob-store-contract";

// The local folder and the S3 store (against s3rver with scripts/s3-stand-in.ts's additions)
// pass the same suite (tests/support/blob-store-contract.ts).
const scratch = await mkdtemp(join(tmpdir(), "twistlog-contract-"));
afterAll(() => rm(scratch, { recursive: true, force: true }));

async function filesUnder(dir: string): Promise<string[]> {
  const entries = await readdir(dir, { recursive: true, withFileTypes: true });
  return entries.filter((e) => e.isFile()).map((e) => relative(dir, join(e.parentPath, e.name)));
}

let localCount = 0;
blobStoreContract("local folder", async () => {
  const root = join(scratch, `local-${localCount++}`);
  const pathOf = (key: string) => join(root, key.slice(0, 2), key.slice(2, 4), `${key}.gz`);
  return {
    store: localBlobStore(root),
    leftovers: () => filesUnder(root),
    storedBytesOf: (key) => readFile(pathOf(key)),
    abandonPart: async () => {
      await writeFile(join(root, "tmp", randomBytes(12).toString("hex")), "half an upload");
    },
  };
});

// s3rver's fixed credentials (node_modules/s3rver/lib/models/account.js).
process.env.AWS_ACCESS_KEY_ID = "S3RVER";
process.env.AWS_SECRET_ACCESS_KEY = "S3RVER";
// The SDK's notice that its releases after January 2027 need Node 22 (package.json allows 20).
process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED = "true";
const Bucket = "twistlog-test";
const s3Dir = join(scratch, "s3");
let standIn: S3StandIn;
let client: S3Client;
beforeAll(async () => {
  // The first free port of this session's 4710-4719.
  for (let port = 4710; port <= 4719 && !standIn; port++)
    standIn = await startS3StandIn({ port, dir: s3Dir, bucket: Bucket }).catch(() => standIn);
  client = new S3Client({ region: "us-east-1", endpoint: standIn.endpoint, forcePathStyle: true });
});
afterAll(() => standIn?.stop());

let s3Count = 0;
blobStoreContract("S3 bucket (s3rver stand-in)", async () => {
  const prefix = `run-${s3Count++}/`;
  // Opened from its plain description, as the analysis worker opens it.
  const store = blobStoreFrom({
    kind: "s3",
    bucket: Bucket,
    region: "us-east-1",
    endpoint: standIn.endpoint,
    prefix,
  });
  return {
    store,
    // Seen with the AWS SDK directly, and in s3rver's own upload folder on disk.
    leftovers: async () => {
      const objects = await client.send(new ListObjectsV2Command({ Bucket, Prefix: prefix }));
      const uploads = await client.send(
        new ListMultipartUploadsCommand({ Bucket, Prefix: prefix }),
      );
      const folder = join(s3Dir, Bucket, "._S3rver_uploads");
      const onDisk: string[] = [];
      for (const id of await readdir(folder).catch(() => [])) {
        const key = await readFile(join(folder, id, "key"), "utf8").catch(() => prefix);
        if (key.startsWith(prefix)) onDisk.push(id);
      }
      return [
        ...(objects.Contents ?? []).map((o) => `object ${o.Key}`),
        ...(uploads.Uploads ?? []).map((u) => `upload ${u.Key} ${u.UploadId}`),
        ...onDisk.map((id) => `s3rver upload folder ${id}`),
      ];
    },
    storedBytesOf: async (key) => {
      const Key = `${prefix}blobs/${key.slice(0, 2)}/${key.slice(2, 4)}/${key}.gz`;
      const answer = await client.send(new GetObjectCommand({ Bucket, Key }));
      return Buffer.from(await answer.Body!.transformToByteArray());
    },
    abandonPart: async () => {
      const part = () => `${prefix}parts/${randomBytes(12).toString("hex")}`;
      await client.send(new PutObjectCommand({ Bucket, Key: part(), Body: "half a copy" }));
      const Key = part();
      const { UploadId } = await client.send(new CreateMultipartUploadCommand({ Bucket, Key }));
      await client.send(
        new UploadPartCommand({ Bucket, Key, UploadId, PartNumber: 1, Body: randomBytes(1000) }),
      );
    },
  };
});

describe("STORAGE settings", () => {
  it("refuses STORAGE=s3 without a bucket, in one line naming S3_BUCKET", () => {
    expect(() => getEnv({ STORAGE: "s3" })).toThrow(/^S3_BUCKET is not valid \([^\n]*\)[^\n]*$/);
    expect(getEnv({ STORAGE: "s3", S3_BUCKET: "twistlog" })).toMatchObject({
      STORAGE: "s3",
      S3_REGION: "us-east-1",
    });
    expect(getEnv({}).STORAGE).toBe("local");
    expect(() => getEnv({ STORAGE: "ftp" })).toThrow(/^STORAGE is not valid/);
  });

  it("describes the bucket for the workers when STORAGE=s3, the folder otherwise", async () => {
    vi.resetModules();
    vi.stubEnv("STORAGE", "s3");
    vi.stubEnv("S3_BUCKET", "kestrel-logs");
    vi.stubEnv("S3_ENDPOINT", "http://127.0.0.1:4569");
    const settings = await import("~/lib/infra/storage-settings.server");
    expect(settings.blobStoreDescription()).toEqual({
      kind: "s3",
      bucket: "kestrel-logs",
      region: "us-east-1",
      endpoint: "http://127.0.0.1:4569",
    });
    vi.unstubAllEnvs();
    vi.resetModules();
    const local = await import("~/lib/infra/storage-settings.server");
    expect(local.blobStoreDescription()).toMatchObject({ kind: "local" });
  });
});
