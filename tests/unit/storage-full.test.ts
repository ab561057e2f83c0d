import { existsSync } from "node:fs";
import { mkdtemp, readdir, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { finished, Writable } from "node:stream";
import { afterAll, describe, expect, it, vi } from "vitest";

// A disk that fills up mid-write: the blob store's file write takes the first 1 kB, then fails
// the way Linux does when a file system is full (write(2): ENOSPC, "No space left on device").
const disk = vi.hoisted(() => ({ full: false, paths: [] as string[] }));
vi.mock("node:fs", async (importOriginal) => {
  const real = await importOriginal<typeof import("node:fs")>();
  const createWriteStream = ((path: string, options?: unknown) => {
    const file = real.createWriteStream(path, options as never);
    if (!disk.full) return file;
    disk.paths.push(path);
    let written = 0;
    return new Writable({
      write(chunk: Buffer, _enc, done) {
        written += chunk.length;
        if (written > 1024) {
          done(
            Object.assign(new Error("ENOSPC: no space left on device, write"), {
              code: "ENOSPC",
              errno: -28,
              syscall: "write",
            }),
          );
          return;
        }
        file.write(chunk, done);
      },
      destroy(error, done) {
        file.destroy();
        finished(file, () => done(error));
      },
    });
  }) as typeof real.createWriteStream;
  return { ...real, default: { ...real, createWriteStream }, createWriteStream };
});

const { localBlobStore } = await import("~/lib/infra/storage.server");
const { receiveUpload, UploadError } = await import("~/lib/http/uploads.server");

const root = await mkdtemp(join(tmpdir(), "twistlog-full-"));
const store = localBlobStore(root);
afterAll(() => rm(root, { recursive: true, force: true }));

describe("an upload onto a full disk", () => {
  it("answers 507 storage_full with a message that says to ask an admin, and removes the partial file", async () => {
    disk.full = true;
    const csv =
      "time [s],crank speed [rpm],gearbox input speed [rpm]\n" + "0.001,800,800\n".repeat(20_000);
    const form = new FormData();
    form.set("condition", "idle-neutral");
    form.set("file", new Blob([csv]), "long.csv");
    const request = new Request("http://localhost/upload", { method: "POST", body: form });
    const attempt = receiveUpload(request, { store, maxBytes: 10 * 1024 * 1024 });
    // 507 Insufficient Storage: RFC 4918 §11.5.
    await expect(attempt).rejects.toBeInstanceOf(UploadError);
    await expect(attempt).rejects.toMatchObject({ status: 507, code: "storage_full" });
    await expect(attempt).rejects.toThrow(/storage is full.*long\.csv.*ask an admin/i);
    disk.full = false;
    // The write really began (a partial file existed) and was removed; no blob was kept.
    expect(disk.paths).toHaveLength(1);
    expect(existsSync(disk.paths[0]!)).toBe(false);
    expect(await readdir(join(root, "tmp"))).toEqual([]);
    expect(await readdir(root)).toEqual(["tmp"]);
  });
});
