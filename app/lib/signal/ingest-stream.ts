/**
 * Node adapter for the ingest (the only Node-specific part of it): reads a file or a readable
 * chunk by chunk into createIngester, so a large log never sits in memory as text.
 */
import { createReadStream } from "node:fs";
import { open, stat } from "node:fs/promises";
import type { Readable } from "node:stream";
import { listCsvChannels } from "./csv-channels.ts";
import { sniffFormat } from "./format.ts";
import { createIngester, type IngestOptions } from "./ingest.ts";
import { listMdf4Channels } from "./mdf4/index.ts";
import type { ChannelInfo, DriveLog, Outcome } from "./types.ts";

/**
 * Read size in bytes. On the bench log 256 KiB was as fast as 1 MiB (64 KiB was slower), and
 * with one reused buffer there is no per-chunk garbage at all.
 */
const CHUNK_BYTES = 1 << 18;
function failed(code: "read_failed" | "file_not_found", message: string): Outcome<DriveLog> {
  return { ok: false, error: { code, message }, warnings: [] };
}

/** Report progress as the fraction (0–1) of bytes read, when the total is known. */
export type ByteProgress = (fraction: number) => void;

/** Ingest from any readable of bytes or strings. A stream error becomes an `read_failed` value. */
export async function ingestStream(
  readable: Readable | AsyncIterable<string | Uint8Array>,
  options: IngestOptions = {},
  onProgress?: ByteProgress,
): Promise<Outcome<DriveLog>> {
  const ingester = createIngester(options);
  let bytes = 0;
  try {
    for await (const chunk of readable as AsyncIterable<string | Uint8Array>) {
      ingester.push(chunk);
      bytes += chunk.length;
      if (onProgress && options.sizeHintBytes)
        onProgress(Math.min(1, bytes / options.sizeHintBytes));
    }
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    return failed("read_failed", `the file could not be read: ${message}`);
  }
  return ingester.finish();
}

/** Ingest a file by path; a missing or unreadable file is a `file_not_found` / `read_failed` value. */
export async function ingestFile(
  path: string,
  options: IngestOptions = {},
  onProgress?: ByteProgress,
): Promise<Outcome<DriveLog>> {
  let size: number;
  try {
    const s = await stat(path);
    if (s.isDirectory()) {
      return failed("read_failed", `${path} is a folder, not a file`);
    }
    size = s.size;
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === "ENOENT") {
      return failed("file_not_found", `no such file: ${path}`);
    }
    return failed("read_failed", `cannot open ${path} (${code ?? "error"})`);
  }
  // One buffer, read into again and again: a stream would allocate a new one per chunk, and
  // those wait for a collection while counting in the resident size (measured on the bench log).
  const all = { sizeHintBytes: size, ...options };
  const ingester = createIngester(all);
  const buf = Buffer.allocUnsafe(CHUNK_BYTES);
  let fh;
  try {
    fh = await open(path, "r");
    let bytes = 0;
    for (;;) {
      const { bytesRead } = await fh.read(buf, 0, CHUNK_BYTES, null);
      if (bytesRead === 0) break;
      ingester.push(buf.subarray(0, bytesRead));
      bytes += bytesRead;
      onProgress?.(size > 0 ? Math.min(1, bytes / size) : 1);
    }
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    return failed("read_failed", `the file could not be read: ${message}`);
  } finally {
    await fh?.close();
  }
  return ingester.finish();
}

/**
 * Every channel of a drive log file (CSV or MDF4, told by content) with its unit, rate, count,
 * range and recognised role: the channel picker's and `--list-channels`' source.
 */
export async function listChannelsOfFile(
  path: string,
  options: IngestOptions = {},
): Promise<Outcome<ChannelInfo[]>> {
  const head = Buffer.alloc(8);
  try {
    const fh = await open(path, "r");
    try {
      await fh.read(head, 0, 8, 0);
    } finally {
      await fh.close();
    }
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const error =
      code === "ENOENT"
        ? { code: "file_not_found", message: `no such file: ${path}` }
        : { code: "read_failed", message: `cannot open ${path} (${code ?? "error"})` };
    return { ok: false, error, warnings: [] };
  }
  if (sniffFormat(head) === "mdf4") return listMdf4Channels(path, options);
  return listCsvChannels(createReadStream(path), options);
}

/**
 * The channel list of a drive log read from a readable (the server's stored file): CSV in one
 * streaming pass; MDF4 needs random access, so it is spooled to a temporary file first (STUB:
 * MDF4 lands with the reader).
 */
export async function listChannelsOfStream(
  readable: Readable | AsyncIterable<string | Uint8Array>,
  options: IngestOptions = {},
): Promise<Outcome<ChannelInfo[]>> {
  return listCsvChannels(readable as AsyncIterable<string | Uint8Array>, options);
}
