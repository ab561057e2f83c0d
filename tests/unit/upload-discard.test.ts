import { mkdtemp, readdir, rm, utimes } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { afterAll, beforeEach, describe, expect, it } from "vitest";
import { localBlobStore, type BlobStore } from "~/lib/infra/storage.server";
import {
  discardReceived,
  keepReceived,
  receiveUpload,
  recordUpload,
  UploadError,
} from "~/lib/http/uploads.server";

// What a refused upload leaves in the store (issue 12 §6): nothing it wrote, and nothing that
// another upload or drive log still needs. Multipart bodies are built by the platform's
// FormData/Request (WHATWG Fetch), in insertion order.

let root = "";
let store: BlobStore;
const roots: string[] = [];
beforeEach(async () => {
  root = await mkdtemp(join(tmpdir(), "twistlog-discard-"));
  roots.push(root);
  store = localBlobStore(root);
});
afterAll(async () => {
  for (const r of roots) await rm(r, { recursive: true, force: true });
});

const csv = (tag: string) => `time [s],crank speed [rpm]\n# ${tag}\n0,800\n0.001,801\n`;

function multipart(parts: [string, string | { name: string; text: string }][]) {
  const form = new FormData();
  for (const [k, v] of parts) {
    if (typeof v === "string") form.append(k, v);
    else form.append(k, new Blob([v.text]), v.name);
  }
  return new Request("http://localhost/upload", { method: "POST", body: form });
}

/** Stored files (not tmp/ parts) under the store's root. */
async function storedFiles(): Promise<string[]> {
  const out: string[] = [];
  for (const a of await readdir(root)) {
    if (a === "tmp") continue;
    for (const b of await readdir(join(root, a))) out.push(...(await readdir(join(root, a, b))));
  }
  return out;
}

describe("refused uploads leave nothing", () => {
  it("a refusal at the first file part stores nothing and hands on what was thrown", async () => {
    let puts = 0;
    const counting: BlobStore = { ...store, put: (s, o) => (puts++, store.put(s, o)) };
    const seen: Record<string, string>[] = [];
    const refusal = new Response("bad token", { status: 403 });
    const attempt = receiveUpload(
      multipart([
        ["csrf", "wrong"],
        ["file", { name: "a.csv", text: csv("a") }],
        ["notes", "after the file"],
        ["file", { name: "b.csv", text: csv("b") }],
      ]),
      {
        store: counting,
        maxBytes: 1024,
        beforeFirstFile: async (fields) => {
          seen.push(fields);
          throw refusal;
        },
      },
    );
    await expect(attempt).rejects.toBe(refusal);
    expect(puts).toBe(0);
    // Called once, with only the fields sent before the first file.
    expect(seen).toEqual([{ csrf: "wrong" }]);
    expect(await storedFiles()).toEqual([]);
    expect(await readdir(join(root, "tmp"))).toEqual([]);
  });

  it("too many files: 413 too_many_files and the files already stored are removed", async () => {
    const attempt = receiveUpload(
      multipart([
        ["file", { name: "a.csv", text: csv("a") }],
        ["file", { name: "b.csv", text: csv("b") }],
      ]),
      { store, maxBytes: 1024, maxFiles: 1 },
    );
    await expect(attempt).rejects.toMatchObject({ status: 413, code: "too_many_files" });
    expect(await storedFiles()).toEqual([]);
  });

  it("an empty file beside a good one: 422 empty_file and neither is kept", async () => {
    const attempt = receiveUpload(
      multipart([
        ["file", { name: "good.csv", text: csv("good") }],
        ["file", { name: "empty.csv", text: "" }],
      ]),
      { store, maxBytes: 1024 },
    );
    await expect(attempt).rejects.toMatchObject({ status: 422, code: "empty_file" });
    expect(await storedFiles()).toEqual([]);
  });

  it("recordUpload: a refusal after the files are in (token, fields, record) removes them", async () => {
    const cases = [
      { afterReceive: () => Promise.reject(new Response("no", { status: 403 })) },
      { parts: [["condition", "no-such-condition"]] as [string, string][] },
      { record: () => Promise.reject(Object.assign(new Error("gone"), { code: "ECONNREFUSED" })) },
      { record: () => Promise.reject(new Error("a bug, not an outage")) },
    ];
    const outcomes = [];
    for (const c of cases) {
      const attempt = recordUpload(
        multipart([...(c.parts ?? []), ["file", { name: "a.csv", text: csv("record") }]]),
        {
          store,
          maxBytes: 1024,
          afterReceive: c.afterReceive,
          record: c.record ?? (() => Promise.resolve("recorded")),
        },
      );
      outcomes.push(await attempt.then(String, (e: unknown) => e));
      expect(await storedFiles()).toEqual([]);
    }
    expect((outcomes[0] as Response).status).toBe(403);
    expect(outcomes[1]).toMatchObject({ status: 400, code: "invalid_metadata" });
    expect(outcomes[2]).toMatchObject({ status: 503, code: "database_unavailable" });
    expect(outcomes[2]).toBeInstanceOf(UploadError);
    expect(outcomes[3]).toMatchObject({ message: "a bug, not an outage" });
  });

  it("a file in another field is missing_file; the form gets its own sentence", async () => {
    const attempt = recordUpload(multipart([["data", { name: "a.csv", text: csv("x") }]]), {
      store,
      maxBytes: 1024,
      record: () => Promise.resolve(null),
    });
    await expect(attempt).rejects.toMatchObject({
      status: 400,
      code: "missing_file",
      forPage: "Choose at least one drive log file.",
    });
    expect(await storedFiles()).toEqual([]);
  });

  it("recorded files stay; a file sent in another field beside them does not", async () => {
    const keys = await recordUpload(
      multipart([
        ["file", { name: "a.csv", text: csv("kept") }],
        ["attachment", { name: "b.csv", text: csv("not a drive log") }],
        // The same bytes as the recorded file, in another field: the recorded file stays.
        ["extra", { name: "c.csv", text: csv("kept") }],
      ]),
      {
        store,
        maxBytes: 1024,
        record: (files) => Promise.resolve(files.map((f) => f.stored.key)),
      },
    );
    expect(keys).toHaveLength(1);
    expect(await storedFiles()).toEqual([`${keys[0]}.gz`]);
  });
});

describe("a refusal never removes a file someone else needs", () => {
  it("keeps the file while another upload of the same bytes (this process) holds it", async () => {
    const text = csv("shared");
    const first = await receiveUpload(multipart([["file", { name: "a.csv", text }]]), {
      store,
      maxBytes: 1024,
    });
    const second = await receiveUpload(multipart([["file", { name: "b.csv", text }]]), {
      store,
      maxBytes: 1024,
    });
    expect(first.files[0]!.stored.created).toBe(true);
    expect(second.files[0]!.stored.created).toBe(false);
    await discardReceived(store, first);
    expect(await store.has(first.files[0]!.stored.key)).toBe(true);
    keepReceived(second);
    expect(await store.has(first.files[0]!.stored.key)).toBe(true);
  });

  it("keeps a file that was there before the refused upload (a drive log may hold it)", async () => {
    const text = csv("earlier");
    const earlier = await store.put(Readable.from([text]));
    const refused = await receiveUpload(multipart([["file", { name: "a.csv", text }]]), {
      store,
      maxBytes: 1024,
    });
    await discardReceived(store, refused);
    expect(await store.has(earlier.key)).toBe(true);
  });

  it("keeps a file put again (another app instance) after the refused upload wrote it", async () => {
    const text = csv("other instance");
    const refused = await receiveUpload(multipart([["file", { name: "a.csv", text }]]), {
      store,
      maxBytes: 1024,
    });
    const { key, modifiedAt } = refused.files[0]!.stored;
    // Make the two writes a minute apart so the modified times differ for sure.
    const before = new Date(modifiedAt.getTime() - 60_000);
    const path = join(root, key.slice(0, 2), key.slice(2, 4), `${key}.gz`);
    await utimes(path, before, before);
    const otherInstance = localBlobStore(root); // no shared in-process holds
    const again = await otherInstance.put(Readable.from([text]));
    expect(again.created).toBe(false);
    expect(again.modifiedAt.getTime()).toBeGreaterThan(before.getTime());
    await discardReceived(store, {
      files: [
        { ...refused.files[0]!, stored: { ...refused.files[0]!.stored, modifiedAt: before } },
      ],
    });
    expect(await store.has(key)).toBe(true);
  });
});
