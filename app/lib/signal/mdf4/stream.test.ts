/**
 * MDF4 through the format-neutral entry points (ingest-stream.ts): a path, and a readable of
 * the bytes (the server's stored files), which goes through a temporary file that is removed
 * afterwards — also when the stream fails. Reference file: tests/fixtures/mdf4 (independent).
 */
import { readdirSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import {
  ingestFile,
  ingestStream,
  listChannelsOfFile,
  listChannelsOfStream,
} from "../ingest-stream.ts";
import { analyseSource } from "../pipeline.ts";

const path = join(import.meta.dirname, "../../../../tests/fixtures/mdf4/drive-log-unsorted.mf4");
const spools = () =>
  readdirSync(tmpdir())
    .filter((n) => n.startsWith("twistlog-mdf4-"))
    .sort();

/** The file's bytes in small pieces, as a stored (decompressed) upload arrives. */
function pieces(bytes: Buffer, fail = false): Readable {
  async function* gen() {
    for (let i = 0; i < bytes.length; i += 7000) {
      if (fail && i > 50_000) throw new Error("storage went away");
      yield bytes.subarray(i, i + 7000);
    }
  }
  return Readable.from(gen());
}

describe("MDF4 through the stream adapter", () => {
  const bytes = readFileSync(path);

  it("a readable gives the same log and channel list as the file, and leaves no temporary file", async () => {
    const before = spools();
    const fromFile = await ingestFile(path);
    const fromStream = await ingestStream(pieces(bytes));
    expect(fromFile.ok && fromStream.ok).toBe(true);
    if (!fromFile.ok || !fromStream.ok) return;
    expect(fromStream.value.crankRadS).toEqual(fromFile.value.crankRadS);
    expect(fromStream.value.gearboxRadS).toEqual(fromFile.value.gearboxRadS);
    expect(fromStream.value.source.format).toBe("mdf4");
    const listFile = await listChannelsOfFile(path);
    const listStream = await listChannelsOfStream(pieces(bytes));
    expect(listStream).toEqual(listFile);
    expect(spools()).toEqual(before);
  });

  it("a stream that fails part way is a read_failed value, and its temporary file is gone", async () => {
    const before = spools();
    const r = await ingestStream(pieces(bytes, true));
    expect(r.ok).toBe(false);
    expect(!r.ok && r.error.code).toBe("read_failed");
    expect(spools()).toEqual(before);
  });

  it("the pipeline analyses an MDF4 file by content, whatever its name", async () => {
    const r = await analyseSource({ source: pieces(bytes), ingest: {}, analysis: {} });
    expect(r.ok).toBe(true);
    expect(r.ok && r.value.result.source?.format).toBe("mdf4");
    expect(r.ok && r.value.result.source?.channels).toEqual({
      time: "Fast/t",
      crank: "crank_speed",
      gearbox: "input_shaft_speed",
    });
  });
});
