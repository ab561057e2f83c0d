/**
 * The spooled ingest (docs/signal-ingest.md, "Spooled ingest"): a drive log file or stream →
 * a SampleSource (sample-source.ts) whose samples wait in temporary files, so reading a log
 * takes memory independent of its length. The same steps, checks, repairs, warnings and
 * refusals as the batch ingest (ingest.ts, ingest-stream.ts), which returns the DriveLog in
 * memory: the head as there (csv-head.ts, ingest-header.ts), the rows through the same row
 * reader in windows (ingest-spool-rows.ts) into the spool (sample-spool.ts) with running figures,
 * and the whole-log checks from those figures (ingest-spool-finish.ts). Extra columns are not
 * kept. MDF4 goes through mdf4/samples.ts, record piece by record piece.
 */
import { open, stat } from "node:fs/promises";
import { createHeadCollector, type HeadResult } from "./csv-head.ts";
import { sniffFormat } from "./format.ts";
import { csvSource } from "./ingest-channels.ts";
import { resolveHead, type LogHeader } from "./ingest-header.ts";
import { finishSpooled, RunningFigures } from "./ingest-spool-finish.ts";
import { createWindowedRows, type WindowedRows } from "./ingest-spool-rows.ts";
import { sniffStream, spooled, type ByteProgress, type Chunks } from "./ingest-stream.ts";
import type { IngestOptions } from "./ingest.ts";
import { ingestMdf4Samples } from "./mdf4/samples.ts";
import type { SampleSource } from "./sample-source.ts";
import { SampleSpool } from "./sample-spool.ts";
import { rateMismatch } from "./stated-rate.ts";
import type { Outcome, SignalIssue } from "./types.ts";

/** Read size in bytes, as ingest-stream.ts reads a file. */
const CHUNK_BYTES = 1 << 18;

const failed = (code: string, message: string): Outcome<SampleSource> => ({
  ok: false,
  error: { code, message },
  warnings: [],
});

/** Chunk by chunk like createIngester (ingest.ts), into a spool; finish() once. */
export interface SampleIngester {
  push(chunk: string | Uint8Array): void;
  finish(): Outcome<SampleSource>;
  /** Removes the temporary files (after a read error, when finish() is never called). */
  abort(): void;
}

/** A CSV ingester into a spool (options as IngestOptions). */
export function createSampleIngester(options: IngestOptions = {}): SampleIngester {
  const warnings: SignalIssue[] = [];
  const limits = {
    maxRpm: options.maxRpm ?? 12000,
    minRpm: options.minRpm ?? -20,
    strict: options.strict === true,
  };
  let error: SignalIssue | undefined;
  let header: LogHeader | undefined;
  let rows: WindowedRows | undefined;
  let spool: SampleSpool | undefined;
  const figures = new RunningFigures(options);
  const collector = createHeadCollector(options);
  let head = true;
  const failedNow = () => error ?? rows?.error;

  function startData(read: HeadResult, atEnd: boolean): void {
    head = false;
    const prefix = collector.take();
    const resolved = read.ok ? resolveHead(read.value, options) : read;
    if (!resolved.ok) {
      error = resolved.error;
      return;
    }
    header = resolved.value;
    warnings.push(...header.warnings);
    const sp = new SampleSpool();
    spool = sp;
    const rowsFrom = { ...header, headerLine: header.lastHeadLine };
    rows = createWindowedRows(rowsFrom, limits, warnings, (t, c, g, from, to) => {
      sp.append(0, t, from, to);
      sp.append(1, c, from, to);
      sp.append(2, g, from, to);
      figures.add(t, c, g, from, to);
    });
    rows.push(prefix.subarray(header.dataStart), atEnd);
  }

  function push(chunk: string | Uint8Array): void {
    if (failedNow()) return;
    const bytes =
      typeof chunk === "string"
        ? new TextEncoder().encode(chunk)
        : new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength);
    if (head) {
      const read = collector.push(bytes);
      if (read) startData(read, false);
      return;
    }
    rows?.push(bytes, false);
  }

  function abort(): void {
    spool?.discard();
  }

  function finish(): Outcome<SampleSource> {
    try {
      if (!failedNow() && head) startData(collector.finish(), true);
      else if (!failedNow()) rows?.push(new Uint8Array(0), true);
      if (!failedNow() && header && rows?.rows === 0)
        error = {
          code: "no_data_rows",
          message: "the file has a header but no data rows",
          row: header.lastHeadLine + 1,
        };
      const problem = failedNow();
      if (problem || !header || !rows || !spool) {
        abort();
        return {
          ok: false,
          error: problem ?? { code: "empty_file", message: "the file is empty" },
          warnings,
        };
      }
      const { skipped } = rows;
      const firstDataLine = header.lastHeadLine + 1;
      const rowOf = (i: number) => firstDataLine + i + skipped.filter((k) => k <= i).length;
      const finished = finishSpooled(spool, figures, csvSource(header, rows.rows), rowOf, options);
      const stated = finished.ok ? rateMismatch(header.statedRateHz, finished.value) : [];
      return { ...finished, warnings: [...warnings, ...finished.warnings, ...stated] };
    } catch (e) {
      abort();
      throw e;
    }
  }

  return { push, finish, abort };
}

/** Reads chunks into a fresh ingester; a read error becomes `read_failed`. */
async function fromChunks(
  read: (push: (chunk: string | Uint8Array) => void) => Promise<void>,
  options: IngestOptions,
): Promise<Outcome<SampleSource>> {
  const ingester = createSampleIngester(options);
  try {
    await read(ingester.push);
  } catch (e) {
    ingester.abort();
    const message = e instanceof Error ? e.message : String(e);
    return failed("read_failed", `the file could not be read: ${message}`);
  }
  return ingester.finish();
}

/**
 * A drive log (a path, a readable or chunks; CSV or MDF4, told by content) as a SampleSource, with
 * the warnings and refusals ingestFile / ingestStream give. Close the source when done: its
 * samples are temporary files.
 */
export async function ingestSamples(
  source: string | Chunks,
  options: IngestOptions = {},
  onProgress?: ByteProgress,
): Promise<Outcome<SampleSource>> {
  if (typeof source !== "string") {
    let bytes = 0;
    try {
      const { format, chunks } = await sniffStream(source);
      if (format === "mdf4")
        return await spooled(chunks, (path) => ingestMdf4Samples(path, options, onProgress));
      return await fromChunks(async (push) => {
        for await (const chunk of chunks) {
          push(chunk);
          bytes += chunk.length;
          if (onProgress && options.sizeHintBytes)
            onProgress(Math.min(1, bytes / options.sizeHintBytes));
        }
      }, options);
    } catch (e) {
      const message = e instanceof Error ? e.message : String(e);
      return failed("read_failed", `the file could not be read: ${message}`);
    }
  }
  const path = source;
  let size: number;
  try {
    const s = await stat(path);
    if (s.isDirectory()) return failed("read_failed", `${path} is a folder, not a file`);
    size = s.size;
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === "ENOENT") return failed("file_not_found", `no such file: ${path}`);
    return failed("read_failed", `cannot open ${path} (${code ?? "error"})`);
  }
  const fh = await open(path, "r").catch(() => undefined);
  if (!fh) return failed("read_failed", `cannot open ${path}`);
  try {
    const headBytes = Buffer.alloc(8);
    await fh.read(headBytes, 0, 8, 0);
    if (sniffFormat(headBytes) === "mdf4")
      return await ingestMdf4Samples(path, options, onProgress);
    const buf = Buffer.allocUnsafe(CHUNK_BYTES);
    return await fromChunks(async (push) => {
      let bytes = 0;
      for (;;) {
        const { bytesRead } = await fh.read(buf, 0, CHUNK_BYTES, bytes);
        if (bytesRead === 0) break;
        push(buf.subarray(0, bytesRead));
        bytes += bytesRead;
        onProgress?.(size > 0 ? Math.min(1, bytes / size) : 1);
      }
    }, options);
  } finally {
    await fh.close();
  }
}
