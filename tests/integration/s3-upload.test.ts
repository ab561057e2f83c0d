import { createHash } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { connect } from "node:net";
import { join } from "node:path";
import { gunzipSync, gzipSync } from "node:zlib";
import {
  CreateMultipartUploadCommand,
  GetObjectCommand,
  ListMultipartUploadsCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  UploadPartCommand,
} from "@aws-sdk/client-s3";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { startS3StandIn, type S3StandIn } from "../../scripts/s3-stand-in";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { useJobTestbed } from "../support/scratch-db";

// The production server with STORAGE=s3 against the stand-in (docs/s3-storage.md): an upload
// streams into the bucket, the analysis worker opens the store from its description and reads
// the file from there, and the raw download reads it back — the bytes checked with node:crypto's
// SHA-256 (FIPS 180-4) and zlib's one-shot gunzip (RFC 1952), the bucket listed with the AWS SDK.
const testbed = await useJobTestbed("s3up");
const { startUploadBed } = await import("../support/upload-bed");
const { db, pool } = await import("~/lib/infra/db.server");
const { blobStoreFrom } = await import("~/lib/infra/storage.server");
const { sweepStorage } = await import("~/lib/infra/storage-sweep.server");
const { TEST_PASSWORD } = await import("../support/accounts");
const { HttpClient } = await import("../support/http-client");

process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED = "true"; // Node 20 notice
const Bucket = "kestrel-logs";
const credentials = { AWS_ACCESS_KEY_ID: "S3RVER", AWS_SECRET_ACCESS_KEY: "S3RVER" };
Object.assign(process.env, credentials); // for the store the sweep below opens here
const dir = await mkdtemp(join(tmpdir(), "twistlog-s3up-"));
let standIn: S3StandIn;
let client: S3Client;
let bed: Awaited<ReturnType<typeof startUploadBed>>;

beforeAll(async () => {
  // The first free port of this session's 4710-4719.
  for (let port = 4719; port >= 4710 && !standIn; port--)
    standIn = await startS3StandIn({ port, dir, bucket: Bucket }).catch(() => standIn);
  client = new S3Client({
    region: "us-east-1",
    endpoint: standIn.endpoint,
    forcePathStyle: true,
    credentials: { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" },
  });
  bed = await startUploadBed(
    "S3Upload",
    {
      ...testbed.serverEnv,
      ...credentials,
      AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: "true",
      STORAGE: "s3",
      S3_BUCKET: Bucket,
      S3_ENDPOINT: standIn.endpoint,
    },
    { name: "Bucket car", identifier: "K-S3-1" },
  );
});
afterAll(async () => {
  await bed?.server.stop();
  await standIn?.stop();
  await pool.end();
  await testbed.close();
  await rm(dir, { recursive: true, force: true });
});

async function settled(id: number) {
  for (let i = 0; i < 600; i++) {
    const [row] = await db.select().from(driveLogs).where(eq(driveLogs.id, id));
    if (row && (row.status === "done" || row.status === "failed")) return row;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`drive log ${id} was not analysed`);
}

describe("drive logs in an S3-compatible bucket", () => {
  it("stores the upload in the bucket, analyses it from there and serves the same bytes", async () => {
    // An analytic idle log (tests/support/analytic-log.ts).
    const csv = analyticIdleCsv({ ...IDLE_800, durationS: 2 });
    const sha256 = createHash("sha256").update(csv).digest("hex");
    const r = await bed.upload(new Blob([csv], { type: "text/csv" }), "bucket.csv");
    expect(r.status).toBe(202);
    const id = ((await r.json()) as { log: { id: number } }).log.id;

    const row = await settled(id);
    expect(row.status).toBe("done");
    expect(row.blobKey).toBe(sha256);

    const Key = `blobs/${sha256.slice(0, 2)}/${sha256.slice(2, 4)}/${sha256}.gz`;
    const object = await client.send(new GetObjectCommand({ Bucket, Key }));
    const raw = gunzipSync(Buffer.from(await object.Body!.transformToByteArray()));
    expect(createHash("sha256").update(raw).digest("hex")).toBe(sha256);

    const viewer = new HttpClient(bed.server.url);
    expect((await viewer.signIn(bed.team.accounts.viewer.email, TEST_PASSWORD)).status).toBe(302);
    const file = await fetch(`${bed.server.url}/vehicles/${bed.vehicleId}/logs/${id}/file`, {
      headers: { Cookie: viewer.cookieHeader(), "X-Forwarded-For": viewer.ip },
    });
    expect(file.status).toBe(200);
    expect(await file.text()).toBe(csv);

    // Nothing but the stored file: no temporary object, no open multipart upload.
    const listed = await client.send(new ListObjectsV2Command({ Bucket }));
    expect((listed.Contents ?? []).map((o) => o.Key)).toEqual([Key]);
    const uploads = await client.send(new ListMultipartUploadsCommand({ Bucket }));
    expect(uploads.Uploads ?? []).toEqual([]);
  });

  it("is swept like the folder: an unreferenced file and abandoned parts go, a drive log's file stays", async () => {
    const kept = (await client.send(new ListObjectsV2Command({ Bucket }))).Contents ?? [];
    expect(kept).toHaveLength(1); // the drive log's file from the test above
    const orphan = createHash("sha256").update("no drive log has this").digest("hex");
    const orphanKey = `blobs/${orphan.slice(0, 2)}/${orphan.slice(2, 4)}/${orphan}.gz`;
    await client.send(
      new PutObjectCommand({ Bucket, Key: orphanKey, Body: gzipSync("no drive log has this") }),
    );
    await client.send(new PutObjectCommand({ Bucket, Key: "parts/0badc0de", Body: "half" }));
    const Key = "parts/0ddba11";
    const { UploadId } = await client.send(new CreateMultipartUploadCommand({ Bucket, Key }));
    await client.send(
      new UploadPartCommand({ Bucket, Key, UploadId, PartNumber: 1, Body: "half a part" }),
    );

    // An hour and a bit later, with the server's grace period (app/lib/infra/storage-sweep.server.ts).
    const store = blobStoreFrom({
      kind: "s3",
      bucket: Bucket,
      region: "us-east-1",
      endpoint: standIn.endpoint,
    });
    const report = await sweepStorage({
      store,
      db,
      graceMs: 3600_000,
      now: new Date(Date.now() + 3600_000 + 5000),
    });
    expect(report).toMatchObject({ files: 1, parts: 2 });
    const left = (await client.send(new ListObjectsV2Command({ Bucket }))).Contents ?? [];
    expect(left.map((o) => o.Key)).toEqual(kept.map((o) => o.Key));
    const uploads = await client.send(new ListMultipartUploadsCommand({ Bucket }));
    expect(uploads.Uploads ?? []).toEqual([]);
  });

  it("an upload cut off mid-body (a closed tab) leaves no multipart upload and no object", async () => {
    const before = ((await client.send(new ListObjectsV2Command({ Bucket }))).Contents ?? []).map(
      (o) => o.Key,
    );
    // Noisy rows, so gzip leaves more than one 8 MiB part of the 40 MB sent (of 100 MB announced).
    const rows: string[] = [];
    for (let i = 0; rows.length < 1_000_000; i++)
      rows.push(
        `${(i / 5000).toFixed(5)},${(800 + Math.random() * 40).toFixed(4)},${(800 + Math.random() * 40).toFixed(4)}`,
      );
    const body = "time [s],crank speed [rpm],gearbox input speed [rpm]\n" + rows.join("\n");
    const url = new URL(bed.server.url);
    const boundary = "----twistlog-cut-off";
    const head =
      `--${boundary}\r\nContent-Disposition: form-data; name="condition"\r\n\r\nidle-neutral\r\n` +
      `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="cut.csv"\r\n` +
      "Content-Type: text/csv\r\n\r\n";
    const socket = connect(Number(url.port), url.hostname);
    socket.on("error", () => {}); // the server may answer or reset: either is fine here
    await new Promise<void>((resolve) => socket.once("connect", resolve));
    socket.write(
      [
        `POST /api/v1/vehicles/${bed.vehicleId}/logs HTTP/1.1`,
        `Host: ${url.host}`,
        `Authorization: Bearer ${bed.technicianToken}`,
        `Content-Type: multipart/form-data; boundary=${boundary}`,
        `Content-Length: ${100 * 1024 * 1024}`,
      ].join("\r\n") +
        "\r\n\r\n" +
        head +
        body,
    );
    // Cut once the bucket holds an open multipart upload of it.
    await vi.waitFor(
      async () => {
        const open = await client.send(new ListMultipartUploadsCommand({ Bucket }));
        expect(open.Uploads ?? []).not.toEqual([]);
      },
      { timeout: 60_000, interval: 50 },
    );
    socket.resetAndDestroy();
    await vi.waitFor(
      async () => {
        const open = await client.send(new ListMultipartUploadsCommand({ Bucket }));
        expect(open.Uploads ?? []).toEqual([]);
        const keys = ((await client.send(new ListObjectsV2Command({ Bucket }))).Contents ?? []).map(
          (o) => o.Key,
        );
        expect(keys).toEqual(before);
      },
      { timeout: 30_000, interval: 100 },
    );
    expect((await fetch(`${bed.server.url}/healthz`)).status).toBe(200);
  });
});
