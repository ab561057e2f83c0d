import { createHash } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { localBlobStore, readAllText } from "~/lib/infra/storage.server";
import { receiveUpload, UploadError } from "~/lib/http/uploads.server";

const root = await mkdtemp(join(tmpdir(), "twistlog-uploads-"));
const store = localBlobStore(root);
afterAll(() => rm(root, { recursive: true, force: true }));

function multipart(
  parts: Record<string, string | { name: string; bytes: Uint8Array<ArrayBuffer> | string }>,
) {
  const form = new FormData();
  for (const [k, v] of Object.entries(parts)) {
    if (typeof v === "string") form.set(k, v);
    else form.set(k, new Blob([v.bytes]), v.name);
  }
  return new Request("http://localhost/upload", { method: "POST", body: form });
}

const csv = "time [s],crank speed [rpm],gearbox input speed [rpm]\n0,800,800\n0.001,801,800\n";

describe("streaming uploads (busboy → storage)", () => {
  it("stores the file under the SHA-256 of its bytes and returns the other fields", async () => {
    const got = await receiveUpload(
      multipart({
        condition: "idle-neutral",
        file: { name: "idle.csv", bytes: csv },
        notes: "A/C on",
      }),
      {
        store,
        maxBytes: 1024,
      },
    );
    expect(got.fields).toEqual({ condition: "idle-neutral", notes: "A/C on" });
    expect(got.files).toHaveLength(1);
    expect(got.files[0]).toMatchObject({ field: "file", fileName: "idle.csv" });
    // Reference: node:crypto over the whole text (FIPS 180-4).
    expect(got.files[0]!.stored.key).toBe(createHash("sha256").update(csv).digest("hex"));
    expect(await readAllText(store, got.files[0]!.stored.key)).toBe(csv);
  });

  it("refuses a binary file (a NUL byte in its first 64 kB) with 422", async () => {
    // PNG signature (ISO/IEC 15948 §5.2) followed by a chunk length with NUL bytes.
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]);
    const attempt = receiveUpload(multipart({ file: { name: "photo.png", bytes: png } }), {
      store,
      maxBytes: 1024,
    });
    await expect(attempt).rejects.toBeInstanceOf(UploadError);
    await expect(attempt).rejects.toMatchObject({ status: 422, code: "not_text" });
  });

  it("takes an ASAM MDF4 file (binary, told by its file id) and keeps it byte for byte", async () => {
    // ASAM MDF 4.2 identification block: file id "MDF     ", format id "4.20    ", program id,
    // then reserved NUL bytes — binary, so only the file id lets it through.
    const id = new Uint8Array(64);
    id.set(new TextEncoder().encode("MDF     4.20    Kestrel "), 0);
    const got = await receiveUpload(multipart({ file: { name: "run.mf4", bytes: id } }), {
      store,
      maxBytes: 1024,
    });
    expect(got.files).toHaveLength(1);
    expect(got.files[0]!.stored.sizeBytes).toBe(64);
    expect(got.files[0]!.stored.key).toBe(createHash("sha256").update(id).digest("hex"));
  });

  it("names both accepted formats when it refuses another binary file", async () => {
    // "MDF " then NUL bytes: not the 8-byte file id, so it is read as a would-be CSV with NULs.
    const bytes = new Uint8Array([0x4d, 0x44, 0x46, 0x20, 0, 0, 0, 0, 0, 0]);
    const attempt = receiveUpload(multipart({ file: { name: "odd.bin", bytes } }), {
      store,
      maxBytes: 1024,
    });
    await expect(attempt).rejects.toMatchObject({
      status: 422,
      code: "not_text",
      message: expect.stringMatching(/CSV text or as ASAM MDF4/),
    });
  });

  it("refuses a file over the limit with 413 and names the limit", async () => {
    const big = "t,crank,gearbox\n" + "0.001,800,800\n".repeat(200);
    const attempt = receiveUpload(multipart({ file: { name: "big.csv", bytes: big } }), {
      store,
      maxBytes: 1024,
    });
    await expect(attempt).rejects.toMatchObject({
      status: 413,
      code: "too_large",
      message: "big.csv is larger than the limit of 1 kB.",
    });
  });

  it("refuses a body that is not multipart with 415", async () => {
    const request = new Request("http://localhost/upload", {
      method: "POST",
      body: csv,
      headers: { "Content-Type": "text/csv" },
    });
    await expect(receiveUpload(request, { store, maxBytes: 1024 })).rejects.toMatchObject({
      status: 415,
    });
  });

  it("refuses an empty file with 422", async () => {
    await expect(
      receiveUpload(multipart({ file: { name: "empty.csv", bytes: "" } }), {
        store,
        maxBytes: 1024,
      }),
    ).rejects.toMatchObject({ status: 422, code: "empty_file" });
  });
});
