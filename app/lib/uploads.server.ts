/**
 * Multipart uploads streamed straight into storage with busboy: a drive log never sits in
 * memory whole (docs/stack-notes.md: never request.formData() on a large upload). Each file passes a
 * content check on its first bytes and the size limit while it streams.
 */
import busboy from "busboy";
import { Readable, Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import type { ReadableStream as NodeReadableStream } from "node:stream/web";
import { BlobTooLargeError, formatBytes, type BlobStore, type StoredBlob } from "./storage.server";

export interface ReceivedFile {
  field: string;
  fileName: string;
  stored: StoredBlob;
}

export interface ReceivedUpload {
  fields: Record<string, string>;
  files: ReceivedFile[];
}

/** An upload the server refuses, with the HTTP status and a message that says what to do. */
export class UploadError extends Error {
  override name = "UploadError";
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

/** Bytes looked at for the content check: enough for a header and the first rows. */
const SNIFF_BYTES = 64 * 1024;

export async function receiveUpload(
  request: Request,
  options: { store: BlobStore; maxBytes: number; maxFiles?: number },
): Promise<ReceivedUpload> {
  const maxFiles = options.maxFiles ?? 20;
  const type = request.headers.get("content-type") ?? "";
  if (!type.toLowerCase().startsWith("multipart/form-data")) {
    throw new UploadError(
      415,
      "unsupported_media_type",
      "Send the drive log as multipart/form-data with the file in the field 'file'.",
    );
  }
  const declared = Number(request.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > options.maxBytes * maxFiles + 1024 * 1024) {
    throw new UploadError(
      413,
      "too_large",
      `The upload is larger than the limit of ${formatBytes(options.maxBytes)} per file.`,
    );
  }
  if (!request.body)
    throw new UploadError(400, "empty_upload", "The upload has no body: choose a file.");

  const parser = busboy({
    headers: { "content-type": type },
    // One byte over the limit lets the store see the overflow and say so.
    limits: { fileSize: options.maxBytes + 1, files: maxFiles, fields: 100, fieldSize: 64 * 1024 },
  });
  const fields: Record<string, string> = {};
  // Every put settles to a value, never a rejection: a failure that arrives while the request
  // is still streaming would otherwise be an unhandled rejection (Promise.all comes later).
  const puts: Promise<ReceivedFile | UploadError | { failed: unknown }>[] = [];
  let tooManyFiles = false;

  parser.on("field", (name, value) => {
    fields[name] = value;
  });
  parser.on("filesLimit", () => (tooManyFiles = true));
  parser.on("file", (field, file, info) => {
    const fileName = info.filename?.trim() || "drive-log.csv";
    if (!info.filename) {
      // An empty file input still sends a part; skip it.
      file.resume();
      return;
    }
    const checked = file.pipe(textCheck(fileName));
    // A cut-off request destroys the part (busboy) → the check → the store's write, which
    // removes its partial file.
    file.on("error", (e) => checked.destroy(e));
    puts.push(
      options.store.put(checked, { maxBytes: options.maxBytes }).then(
        (stored) => {
          if (stored.sizeBytes === 0)
            return new UploadError(
              422,
              "empty_file",
              `${fileName} is empty: choose the drive log file itself.`,
            );
          return { field, fileName, stored };
        },
        (error: unknown) => {
          file.resume(); // keep reading the request so the other parts still arrive
          if (error instanceof BlobTooLargeError) {
            return new UploadError(
              413,
              "too_large",
              `${fileName} is larger than the limit of ${formatBytes(options.maxBytes)}.`,
            );
          }
          if (error instanceof UploadError) return error;
          const code = (error as NodeJS.ErrnoException | undefined)?.code;
          if (code === "ENOSPC" || code === "EDQUOT") {
            return new UploadError(
              507,
              "storage_full",
              `The server's storage is full: ${fileName} was not saved. Ask an admin to free space, then upload it again.`,
            );
          }
          return { failed: error };
        },
      ),
    );
  });

  // pipeline, not pipe: an error on the request body (the client went away mid-upload) reaches
  // the parser instead of being an unhandled 'error' event that ends the process.
  const body = Readable.fromWeb(request.body as unknown as NodeReadableStream);
  let cutOff = false;
  body.once("error", () => (cutOff = true));
  let parseError: Error | undefined;
  await pipeline(body, parser).catch((e: Error) => (parseError = e));
  // Wait for every store write to settle (partial files removed) before answering.
  const results = await Promise.all(puts);
  if (cutOff)
    throw new UploadError(400, "upload_cut_off", "The upload was cut off: send it again.");
  if (parseError)
    throw new UploadError(
      400,
      "bad_upload",
      `The upload could not be read (${parseError.message}).`,
    );
  const refused = results.find((r): r is UploadError => r instanceof UploadError);
  if (refused) throw refused;
  const failed = results.find((r): r is { failed: unknown } => "failed" in r);
  if (failed) throw failed.failed;
  if (tooManyFiles)
    throw new UploadError(413, "too_many_files", `At most ${maxFiles} files at once.`);
  return { fields, files: results as ReceivedFile[] };
}

/**
 * Passes bytes through, refusing a file that is not text: a NUL byte in the first 64 kB
 * (binary formats have them; CSV never does) or no line break in them (no header row).
 */
function textCheck(fileName: string): Transform {
  let seen = 0;
  let sawNewline = false;
  return new Transform({
    transform(chunk: Buffer, _enc, done) {
      if (seen < SNIFF_BYTES) {
        const head = chunk.subarray(0, SNIFF_BYTES - seen);
        if (head.includes(0)) {
          done(
            new UploadError(
              422,
              "not_text",
              `${fileName} is not a text file: upload the drive log as CSV.`,
            ),
          );
          return;
        }
        if (head.includes(10) || head.includes(13)) sawNewline = true;
        seen += head.length;
        if (seen >= SNIFF_BYTES && !sawNewline) {
          done(
            new UploadError(
              422,
              "no_header_row",
              `${fileName} has no line break in its first 64 kB: it does not look like a CSV file with a header row.`,
            ),
          );
          return;
        }
      }
      done(null, chunk);
    },
  });
}

/**
 * Reads and drops the body of a refused upload (403, 404, …) up to `limitBytes`, so the client
 * gets to read the answer instead of a reset connection. A larger body is cut off.
 */
export async function discardBody(request: Request, limitBytes = 16 * 1024 * 1024): Promise<void> {
  if (!request.body || request.bodyUsed) return;
  const reader = request.body.getReader();
  let seen = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) return;
      seen += value.byteLength;
      if (seen > limitBytes) {
        await reader.cancel();
        return;
      }
    }
  } catch {
    // The client went away: nothing to answer.
  }
}
