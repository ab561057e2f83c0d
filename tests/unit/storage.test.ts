import { createHash, randomBytes } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { gunzipSync } from "node:zlib";
import { afterAll, describe, expect, it } from "vitest";
import {
  BlobTooLargeError,
  formatBytes,
  localBlobStore,
  readAllText,
} from "~/lib/infra/storage.server";
import { readFile, readdir } from "node:fs/promises";

const root = await mkdtemp(join(tmpdir(), "twistlog-blobs-"));
const store = localBlobStore(root);
afterAll(() => rm(root, { recursive: true, force: true }));

function chunked(buffer: Buffer, size = 1000): Readable {
  return Readable.from(
    (function* () {
      for (let i = 0; i < buffer.length; i += size) yield buffer.subarray(i, i + size);
    })(),
  );
}

describe("local blob store", () => {
  it("keys a file by the SHA-256 of its raw bytes and gives the same bytes back", async () => {
    const text =
      "time [s],crank speed [rpm],gearbox input speed [rpm]\n" + "0.001,800.1,799.8\n".repeat(5000);
    const raw = Buffer.from(text);
    const stored = await store.put(chunked(raw));
    // Reference: node:crypto's SHA-256 of the whole buffer at once (FIPS 180-4).
    expect(stored.key).toBe(createHash("sha256").update(raw).digest("hex"));
    expect(stored.sizeBytes).toBe(raw.length);
    expect(stored.storedBytes).toBeLessThan(raw.length / 3); // repetitive CSV compresses well
    expect(await readAllText(store, stored.key)).toBe(text);
    expect(await store.has(stored.key)).toBe(true);

    // On disk it is ordinary gzip (RFC 1952): zlib's one-shot gunzip reads it.
    const onDisk = join(root, stored.key.slice(0, 2), stored.key.slice(2, 4), `${stored.key}.gz`);
    expect(gunzipSync(await readFile(onDisk)).equals(raw)).toBe(true);
  });

  it("stores the same content once", async () => {
    const raw = randomBytes(20_000);
    const a = await store.put(chunked(raw, 777));
    const b = await store.put(chunked(raw, 4096));
    expect(a.key).toBe(b.key);
    const dir = join(root, a.key.slice(0, 2), a.key.slice(2, 4));
    expect((await readdir(dir)).filter((f) => f.startsWith(a.key))).toHaveLength(1);
  });

  it("refuses a file over the size limit and leaves nothing behind", async () => {
    const raw = randomBytes(10_000);
    await expect(store.put(chunked(raw), { maxBytes: 9_999 })).rejects.toBeInstanceOf(
      BlobTooLargeError,
    );
    const key = createHash("sha256").update(raw).digest("hex");
    expect(await store.has(key)).toBe(false);
    expect(await readdir(join(root, "tmp"))).toEqual([]);
    // Exactly at the limit is allowed.
    await expect(store.put(chunked(raw), { maxBytes: 10_000 })).resolves.toMatchObject({
      key,
      sizeBytes: 10_000,
    });
  });

  it("refuses keys that are not a SHA-256 (no path tricks)", async () => {
    expect(() => store.read("../../etc/passwd")).toThrow(/not a storage key/);
    await expect(store.has("abc")).resolves.toBe(false);
  });

  it("reports a missing file as a stream error, not a crash", async () => {
    const missing = "0".repeat(64);
    await expect(readAllText(store, missing)).rejects.toMatchObject({ code: "ENOENT" });
  });

  it("formats sizes in binary units", () => {
    expect(formatBytes(1024 ** 3)).toBe("1 GB");
    expect(formatBytes(1.5 * 1024 ** 2)).toBe("1.5 MB");
    expect(formatBytes(2048)).toBe("2 kB");
  });
});
