import { createCipheriv, createHash } from "node:crypto";
import { Readable } from "node:stream";
import { gunzipSync } from "node:zlib";
import { describe, expect, it } from "vitest";
import type { Db } from "~/lib/infra/db.server";
import { sweepStorage } from "~/lib/infra/storage-sweep.server";
import { BlobTooLargeError, readAllText, type BlobStore } from "~/lib/infra/storage.server";

/**
 * The contract every BlobStore keeps (the interface doc in app/lib/infra/storage.server.ts),
 * as one suite run against each store. Each store under test also gives a view of its storage
 * that does not go through the store (the folder read directly, the bucket listed with the AWS
 * SDK), so "nothing left behind" is checked from outside.
 */
export interface StoreUnderTest {
  store: BlobStore;
  /** Every file, object and open multipart upload the store's storage holds, by name. */
  leftovers(): Promise<string[]>;
  /** The stored (compressed) bytes of a key, read without the store. */
  storedBytesOf(key: string): Promise<Buffer>;
  /** Leaves an abandoned part behind, as a request that died mid-upload would. */
  abandonPart(): Promise<void>;
}

const MiB = 1024 * 1024;

/** `total` bytes of an AES-256-CTR keystream (incompressible, reproducible), `piece` at a time. */
function* noise(total: number, piece = MiB, seed = "kestrel"): Generator<Buffer> {
  const key = createHash("sha256").update(seed).digest();
  const cipher = createCipheriv("aes-256-ctr", key, Buffer.alloc(16));
  for (let at = 0; at < total; at += piece)
    yield cipher.update(Buffer.alloc(Math.min(piece, total - at)));
}

const sha256 = (pieces: Iterable<Buffer>) => {
  const h = createHash("sha256");
  for (const p of pieces) h.update(p);
  return h.digest("hex");
};

async function all<T>(items: AsyncIterable<T>): Promise<T[]> {
  const found: T[] = [];
  for await (const item of items) found.push(item);
  return found;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export function blobStoreContract(name: string, makeStore: () => Promise<StoreUnderTest>) {
  describe(`${name}: the BlobStore contract`, () => {
    it("keys a file by the SHA-256 of its raw bytes, stores it as gzip and gives the same bytes back", async () => {
      const { store, storedBytesOf, leftovers } = await makeStore();
      const text = "time [s],crank speed [rpm]\n" + "0.001,800.1\n".repeat(20_000);
      const raw = Buffer.from(text);
      const stored = await store.put(Readable.from([raw.subarray(0, 1000), raw.subarray(1000)]));
      // Reference: node:crypto's SHA-256 of the whole buffer at once (FIPS 180-4).
      expect(stored.key).toBe(createHash("sha256").update(raw).digest("hex"));
      expect(stored).toMatchObject({ sizeBytes: raw.length, created: true });
      expect(await readAllText(store, stored.key)).toBe(text);
      expect(await store.has(stored.key)).toBe(true);
      // The stored form is ordinary gzip (RFC 1952): zlib's one-shot gunzip reads it.
      const onStore = await storedBytesOf(stored.key);
      expect(onStore.length).toBe(stored.storedBytes);
      expect(gunzipSync(onStore).equals(raw)).toBe(true);
      expect(await leftovers()).toHaveLength(1);
    });

    it("streams a 20 MB file through (several 8 MiB parts on S3) and reads it back by stream", async () => {
      const { store, leftovers } = await makeStore();
      const total = 20 * 1000 * 1000;
      const stored = await store.put(Readable.from(noise(total)));
      expect(stored.key).toBe(sha256(noise(total))); // node:crypto, FIPS 180-4
      expect(stored.sizeBytes).toBe(total);
      expect(stored.storedBytes).toBeGreaterThan(2 * 8 * MiB); // noise does not compress
      const back = createHash("sha256");
      let bytes = 0;
      for await (const chunk of store.read(stored.key)) {
        back.update(chunk as Buffer);
        bytes += (chunk as Buffer).length;
      }
      expect(bytes).toBe(total);
      expect(back.digest("hex")).toBe(stored.key);
      expect(await leftovers()).toHaveLength(1);
    });

    it("stores the same content once and marks it modified again", async () => {
      const { store, leftovers } = await makeStore();
      const raw = Buffer.concat([...noise(50_000)]);
      const first = await store.put(Readable.from([raw]));
      // S3 times have whole seconds (LastModified is an HTTP date, RFC 9110 §5.6.7).
      await sleep(1100);
      const second = await store.put(Readable.from([raw.subarray(0, 7), raw.subarray(7)]));
      expect(first.created).toBe(true);
      expect(second).toMatchObject({ key: first.key, created: false });
      expect(second.modifiedAt.getTime()).toBeGreaterThan(first.modifiedAt.getTime());
      const [listed] = await all(store.list("blobs"));
      expect(listed?.modifiedAt.getTime()).toBe(second.modifiedAt.getTime());
      expect(await leftovers()).toHaveLength(1);
    });

    it("refuses a file over the size limit and leaves nothing behind; exactly the limit passes", async () => {
      const { store, leftovers } = await makeStore();
      const raw = Buffer.concat([...noise(10_000)]);
      await expect(store.put(Readable.from([raw]), { maxBytes: 9_999 })).rejects.toBeInstanceOf(
        BlobTooLargeError,
      );
      expect(await store.has(sha256([raw]))).toBe(false);
      expect(await leftovers()).toEqual([]);
      expect(await all(store.list("parts"))).toEqual([]);
      await expect(store.put(Readable.from([raw]), { maxBytes: 10_000 })).resolves.toMatchObject({
        key: sha256([raw]),
        sizeBytes: 10_000,
      });
    });

    it("refuses at the limit in the middle of a multipart upload and leaves nothing behind", async () => {
      const { store, leftovers } = await makeStore();
      const put = store.put(Readable.from(noise(20 * MiB)), { maxBytes: 12 * MiB });
      await expect(put).rejects.toBeInstanceOf(BlobTooLargeError);
      expect(await leftovers()).toEqual([]);
      expect(await all(store.list("parts"))).toEqual([]);
    });

    it("a cut-off upload leaves no multipart upload or object behind", async () => {
      const { store, leftovers } = await makeStore();
      let seenMidway: string[] = [];
      async function* cutOff() {
        yield* noise(12 * MiB);
        // Mid-upload: wait until the write shows in storage (on S3 the open multipart upload).
        for (let i = 0; i < 200 && seenMidway.length === 0; i++) {
          seenMidway = (await all(store.list("parts"))).map((p) => p.name);
          if (seenMidway.length === 0) await sleep(50);
        }
        throw Object.assign(new Error("socket hang up"), { code: "ECONNRESET" });
      }
      await expect(store.put(Readable.from(cutOff()))).rejects.toThrow(/socket hang up/);
      expect(seenMidway.length).toBeGreaterThan(0);
      expect(await leftovers()).toEqual([]);
      expect(await all(store.list("parts"))).toEqual([]);
    });

    it("a re-put right after, even within the same second, keeps the file from a removal conditioned on the first put", async () => {
      // Two uploads of the same bytes (maybe on two instances): the first is refused and cleans
      // up what it stored, the second records a drive log. The clean-up must leave the file.
      const { store } = await makeStore();
      const raw = Buffer.from("time [s],crank speed [rpm]\n0,800\n0.001,801\n");
      const first = await store.put(Readable.from([raw]));
      const second = await store.put(Readable.from([raw]));
      expect([first.created, second.created]).toEqual([true, false]);
      const condition = { ifNotModifiedAfter: first.modifiedAt, ifVersion: first.version };
      expect(await store.remove(first.key, condition)).toBe(false);
      expect(await store.has(first.key)).toBe(true);
      // The second put's own condition still removes it (its upload refused, say).
      const own = { ifNotModifiedAfter: second.modifiedAt, ifVersion: second.version };
      expect(await store.remove(second.key, own)).toBe(true);
    });

    it("deletes a file, and with ifNotModifiedAfter only when it was not written after", async () => {
      const { store, leftovers } = await makeStore();
      const stored = await store.put(Readable.from([Buffer.from("a,b\n1,2\n")]));
      const before = new Date(stored.modifiedAt.getTime() - 1000);
      expect(await store.remove(stored.key, { ifNotModifiedAfter: before })).toBe(false);
      expect(await store.has(stored.key)).toBe(true);
      expect(await store.remove(stored.key, { ifNotModifiedAfter: stored.modifiedAt })).toBe(true);
      expect(await store.has(stored.key)).toBe(false);
      expect(await leftovers()).toEqual([]);
      const again = await store.put(Readable.from([Buffer.from("x\n")]));
      expect(await store.remove(again.key)).toBe(true);
      expect(await store.remove(again.key)).toBe(false);
    });

    it("answers for a missing key: has false, read errors with ENOENT, remove false", async () => {
      const { store } = await makeStore();
      const missing = "0".repeat(64);
      expect(await store.has(missing)).toBe(false);
      await expect(readAllText(store, missing)).rejects.toMatchObject({ code: "ENOENT" });
      expect(await store.remove(missing)).toBe(false);
      expect(() => store.read("../../etc/passwd")).toThrow(/not a storage key/);
      expect(await store.has("abc")).toBe(false);
    });

    it("lists stored files with their sizes and times, and parts until the sweep removes them", async () => {
      const { store, leftovers, abandonPart } = await makeStore();
      const a = await store.put(Readable.from([Buffer.from("first\n")]));
      const b = await store.put(Readable.from([Buffer.from("second\n")]));
      const blobs = await all(store.list("blobs"));
      expect(blobs.sort((x, y) => (x.name < y.name ? -1 : 1))).toEqual(
        [a, b]
          .sort((x, y) => (x.key < y.key ? -1 : 1))
          .map((s) => ({ name: s.key, bytes: s.storedBytes, modifiedAt: s.modifiedAt })),
      );
      expect(await all(store.list("parts"))).toEqual([]);

      await abandonPart();
      const parts = await all(store.list("parts"));
      expect(parts.length).toBeGreaterThan(0);
      const past = new Date(Date.now() - 60_000);
      for (const p of parts)
        expect(await store.removePart(p.name, { ifNotModifiedAfter: past })).toBe(false);
      await expect(store.removePart("../x", { ifNotModifiedAfter: past })).rejects.toThrow(
        /not a part name/,
      );
      // The sweep (app/lib/infra/storage-sweep.server.ts) an hour later: parts need no database;
      // the stored files are referenced, as far as this stand-in database says.
      const db = referencingAll([a.key, b.key]);
      const report = await sweepStorage({
        store,
        db,
        graceMs: 3600_000,
        now: new Date(Date.now() + 3600_000 + 5000),
      });
      expect(report).toMatchObject({ parts: parts.length, files: 0 });
      expect(await all(store.list("parts"))).toEqual([]);
      expect(await leftovers()).toHaveLength(2);
    });
  });
}

/** A database stand-in whose three reference queries answer every given key as referenced. */
function referencingAll(keys: string[]): Db {
  const answer = Promise.resolve(keys.map((key) => ({ key })));
  const query = { from: () => ({ where: () => answer }) };
  return { selectDistinct: () => query } as unknown as Db;
}
