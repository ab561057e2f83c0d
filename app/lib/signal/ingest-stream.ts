/**
 * Node adapter for the ingest (the only Node-specific part of it): reads a file or a readable
 * chunk by chunk into createIngester, so a large log never sits in memory as text.
 */
import { createReadStream } from "node:fs";
import { mkdtemp, open, rm, stat } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Readable } from "node:stream";
import { listCsvChannels } from "./csv-channels.ts";
import { sniffFormat } from "./format.ts";
import { createIngester, type IngestOptions } from "./ingest.ts";
import { ingestMdf4File, listMdf4Channels } from "./mdf4/index.ts";
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

export type Chunks = Readable | AsyncIterable<string | Uint8Array>;

/**
 * The first chunks of a readable (at least 8 bytes, unless it ends first), their format told by
 * content, and the whole stream again (those chunks, then the rest) for the reader that takes it.
 */
export async function sniffStream(readable: Chunks) {
  const it = (readable as AsyncIterable<string | Uint8Array>)[Symbol.asyncIterator]();
  const head: (string | Uint8Array)[] = [];
  let bytes = 0;
  let ended = false;
  while (bytes < 8) {
    const next = await it.next();
    if (next.done) {
      ended = true;
      break;
    }
    head.push(next.value);
    bytes += next.value.length;
  }
  const first = head.map((c) => (typeof c === "string" ? Buffer.from(c) : c));
  const format = sniffFormat(Buffer.concat(first).subarray(0, 8));
  async function* all(): AsyncGenerator<string | Uint8Array> {
    yield* head;
    if (ended) return;
    for (let next = await it.next(); !next.done; next = await it.next()) yield next.value;
  }
  return { format, chunks: all() };
}

/**
 * MDF4 needs random access, and the server's stored files are compressed streams: the stream
 * is written to a temporary file (in os.tmpdir(), removed afterwards, also on error) and read
 * from there.
 */
export async function spooled<T>(
  chunks: AsyncIterable<string | Uint8Array>,
  read: (path: string) => Promise<Outcome<T>>,
): Promise<Outcome<T>> {
  let dir: string | undefined;
  try {
    dir = await mkdtemp(join(tmpdir(), "twistlog-mdf4-"));
    const path = join(dir, "log.mf4");
    const fh = await open(path, "w");
    try {
      for await (const chunk of chunks)
        await fh.write(typeof chunk === "string" ? Buffer.from(chunk) : chunk);
    } finally {
      await fh.close();
    }
    return await read(path);
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    return {
      ok: false,
      error: { code: "read_failed", message: `the file could not be read: ${message}` },
      warnings: [],
    };
  } finally {
    if (dir) await rm(dir, { recursive: true, force: true }).catch(() => undefined);
  }
}

/**
 * Ingest from any readable of bytes or strings: CSV or MDF4, told by content (MDF4 through a
 * temporary file). A stream error becomes a `read_failed` value.
 */
export async function ingestStream(
  readable: Chunks,
  options: IngestOptions = {},
  onProgress?: ByteProgress,
): Promise<Outcome<DriveLog>> {
  const ingester = createIngester(options);
  let bytes = 0;
  try {
    const { format, chunks } = await sniffStream(readable);
    if (format === "mdf4")
      return await spooled(chunks, (path) => ingestMdf4File(path, options, onProgress));
    for await (const chunk of chunks) {
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
  const format = await headFormat(path).catch(() => "csv" as const); // the CSV read reports it
  if (format === "mdf4") return ingestMdf4File(path, options, onProgress);
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
  let format;
  try {
    format = await headFormat(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const error =
      code === "ENOENT"
        ? { code: "file_not_found", message: `no such file: ${path}` }
        : { code: "read_failed", message: `cannot open ${path} (${code ?? "error"})` };
    return { ok: false, error, warnings: [] };
  }
  if (format === "mdf4") return listMdf4Channels(path, options);
  return listCsvChannels(createReadStream(path), options);
}

/** The format of the file at `path`, told by its first 8 bytes (throws what open throws). */
async function headFormat(path: string) {
  const head = Buffer.alloc(8);
  const fh = await open(path, "r");
  try {
    await fh.read(head, 0, 8, 0);
  } finally {
    await fh.close();
  }
  return sniffFormat(head);
}

/**
 * The channel list of a drive log read from a readable (the server's stored file): CSV in one
 * streaming pass; MDF4 needs random access, so it is spooled to a temporary file first.
 */
export async function listChannelsOfStream(
  readable: Chunks,
  options: IngestOptions = {},
): Promise<Outcome<ChannelInfo[]>> {
  try {
    const { format, chunks } = await sniffStream(readable);
    if (format === "mdf4") return await spooled(chunks, (path) => listMdf4Channels(path, options));
    return await listCsvChannels(chunks, options);
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    return {
      ok: false,
      error: { code: "read_failed", message: `the file could not be read: ${message}` },
      warnings: [],
    };
  }
}
