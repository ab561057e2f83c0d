/**
 * The head of a CSV file read from a stream of chunks, for the callers that want the header
 * without ingesting the file: the channel list (csv-channels.ts), the column-mapping preview
 * and the check of a vehicle's remembered columns (server). The same rules as the ingest
 * (ingest-header.ts locateHead), so all of them see the real header behind a preamble.
 */
import {
  HEAD_MAX_BYTES,
  HEAD_MAX_LINES,
  locateHead,
  type CsvHead,
  type HeaderOptions,
} from "./ingest-header.ts";
import type { SignalIssue } from "./types.ts";

export type HeadResult = { ok: true; value: CsvHead } | { ok: false; error: SignalIssue };

/** Collects chunks until the head is decided (same steps as the ingest: 16 lines, doubling). */
export interface HeadCollector {
  /** Adds a chunk; the head once it is decided, else undefined. */
  push(bytes: Uint8Array): HeadResult | undefined;
  /** The end of the input: decides on what there is. */
  finish(): HeadResult;
  /** Every byte pushed so far, joined. */
  prefix(): Uint8Array;
  /** The same, and the collector lets go of it (the ingest's head can be a whole file). */
  take(): Uint8Array;
}

export function createHeadCollector(options: HeaderOptions): HeadCollector {
  let parts: Uint8Array[] = [];
  let bytes = 0;
  let lines = 0;
  let nextTry = 16;
  let decided = false;
  const prefix = (): Uint8Array => {
    if (parts.length === 1) return parts[0] as Uint8Array;
    const all = new Uint8Array(bytes);
    let at = 0;
    for (const part of parts) {
      all.set(part, at);
      at += part.length;
    }
    parts = [all];
    return all;
  };
  const decide = (atEnd: boolean): HeadResult | undefined => {
    const head = locateHead(prefix(), atEnd, options);
    if (head.ok === "more") return undefined;
    decided = true;
    return head;
  };
  return {
    push(chunk) {
      parts.push(chunk.slice()); // a copy: the caller may reuse its buffer
      bytes += chunk.length;
      if (decided) return undefined;
      for (let i = chunk.indexOf(10); i >= 0 && lines < nextTry; i = chunk.indexOf(10, i + 1))
        lines++;
      if (lines < nextTry && bytes < HEAD_MAX_BYTES) return undefined;
      // A full window always decides (locateHead), so undefined means: wait for more lines.
      const head = decide(false);
      if (!head) nextTry = Math.min(nextTry * 2, HEAD_MAX_LINES + 1);
      return head;
    },
    finish: () =>
      decide(true) ?? { ok: false, error: { code: "empty_file", message: "the file is empty" } },
    prefix,
    take() {
      const all = prefix();
      parts = [];
      bytes = 0;
      return all;
    },
  };
}

const asBytes = (chunk: string | Uint8Array): Uint8Array =>
  typeof chunk === "string"
    ? new TextEncoder().encode(chunk)
    : new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength);

/**
 * Reads the head of a stream, and at least `dataLines` lines after it when the file has them
 * (for a preview), at most HEAD_MAX_BYTES beyond that. Stops reading there: leaving the loop
 * ends (destroys) a Node readable. `prefix` holds the bytes read.
 */
export async function readCsvHead(
  chunks: AsyncIterable<string | Uint8Array> | Iterable<string | Uint8Array>,
  options: HeaderOptions = {},
  dataLines = 0,
): Promise<{ head: HeadResult; prefix: Uint8Array }> {
  const collector = createHeadCollector(options);
  let head: HeadResult | undefined;
  for await (const chunk of chunks) {
    const b = asBytes(chunk);
    if (!head) head = collector.push(b);
    else collector.push(b);
    if (head && (!head.ok || enoughLines(collector.prefix(), head.value.dataStart, dataLines)))
      return { head, prefix: collector.prefix() };
  }
  return { head: head ?? collector.finish(), prefix: collector.prefix() };
}

function enoughLines(prefix: Uint8Array, from: number, wanted: number): boolean {
  if (prefix.length - from >= HEAD_MAX_BYTES) return true;
  let n = 0;
  for (let i = prefix.indexOf(10, from); i >= 0 && n < wanted; i = prefix.indexOf(10, i + 1)) n++;
  return n >= wanted;
}
