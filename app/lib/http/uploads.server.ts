/**
 * Multipart uploads streamed straight into storage with busboy: a drive log never sits in
 * memory whole (docs/stack-notes.md: never request.formData() on a large upload). Each file passes a
 * content check on its first bytes and the size limit while it streams.
 */
import busboy from "busboy";
import { Readable, Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import type { ReadableStream as NodeReadableStream } from "node:stream/web";
import { logMetadataSchema, type LogMetadata } from "../domain/vehicle-schema";
import { channelChoiceSchema, choiceMapping } from "../domain/channel-names";
import type { IngestMapping } from "../domain/drive-log-terms";
import { databaseUnavailable } from "../infra/db-errors.server";
import { sniffFormat } from "../signal/format.ts";
import {
  BlobTooLargeError,
  formatBytes,
  type BlobStore,
  type StoredBlob,
} from "../infra/storage.server";

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
    /** For a page, when it says more than `message` (all of a form's problems at once). */
    readonly forPage: string = message,
  ) {
    super(message);
  }
}

/** The upload's drive logs could not be recorded because the database is away: nothing was kept. */
export const DB_UNAVAILABLE_MESSAGE =
  "The database is not answering, so the drive log was not saved and nothing of it was kept. Upload it again in a minute.";

/**
 * The upload path after access is checked, the same for the form and the API: streams the
 * files in, checks the fields, and `record`s them (drive logs, one transaction). Every refusal
 * on the way — an UploadError, a database outage (503 database_unavailable), or what
 * `afterReceive` throws (the form's CSRF check) — removes the files it stored.
 */
export async function recordUpload<T>(
  request: Request,
  options: Parameters<typeof receiveUpload>[1] & {
    afterReceive?: (fields: Record<string, string>) => Promise<void>;
    /** `mapping`: the channels chosen with the upload (timeChannel, …), or null. */
    record: (
      files: ReceivedFile[],
      metadata: LogMetadata,
      mapping: IngestMapping | null,
    ) => Promise<T>;
  },
): Promise<T> {
  const received = await receiveUpload(request, options);
  const files = received.files.filter((f) => f.field === "file");
  let kept = false;
  try {
    await options.afterReceive?.(received.fields);
    if (files.length === 0)
      throw new UploadError(
        400,
        "missing_file",
        "Send the drive log in the multipart field 'file'.",
        "Choose at least one drive log file.",
      );
    const metadata = logMetadataSchema.safeParse(received.fields);
    if (!metadata.success) {
      const issue = metadata.error.issues[0];
      throw new UploadError(
        400,
        "invalid_metadata",
        `${issue?.path.join(".") || "field"}: ${issue?.message ?? "invalid"}`,
        metadata.error.issues.map((i) => i.message).join(" "),
      );
    }
    const choice = channelChoiceSchema.safeParse(received.fields);
    if (!choice.success) {
      const issue = choice.error.issues[0];
      throw new UploadError(
        400,
        "invalid_channel_choice",
        `${issue?.path.join(".") || "field"}: ${issue?.message ?? "invalid"}`,
        choice.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join(" "),
      );
    }
    const mapping = choiceMapping(choice.data);
    const result = await options.record(files, metadata.data, mapping).catch((error: unknown) => {
      if (databaseUnavailable(error))
        throw new UploadError(503, "database_unavailable", DB_UNAVAILABLE_MESSAGE);
      throw error;
    });
    kept = true;
    return result;
  } finally {
    // Files sent in other fields are never recorded. Discarded while the recorded ones are
    // still held, so a copy of a recorded file's bytes cannot take that file with it.
    const recorded = kept ? files : [];
    await discardReceived(options.store, {
      files: received.files.filter((f) => !recorded.includes(f)),
    });
    keepReceived({ files: recorded });
  }
}

/** Bytes looked at for the content check: enough for a header and the first rows. */
const SNIFF_BYTES = 64 * 1024;

/**
 * Streams a multipart upload's files into the store. Every refusal it throws (an UploadError,
 * or what `beforeFirstFile` throws) leaves no stored file behind. The caller then either
 * records the files (`keepReceived`) or refuses them (`discardReceived`) — one of the two, always.
 */
export async function receiveUpload(
  request: Request,
  options: {
    store: BlobStore;
    maxBytes: number;
    maxFiles?: number;
    /**
     * Runs once when the first file part begins, with the fields sent before it; a throw
     * refuses the upload before any file is stored (e.g. a form's CSRF token placed first).
     */
    beforeFirstFile?: (fields: Record<string, string>) => Promise<void>;
  },
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

  let parser: busboy.Busboy;
  try {
    parser = busboy({
      headers: { "content-type": type },
      // One byte over the limit lets the store see the overflow and say so.
      limits: {
        fileSize: options.maxBytes + 1,
        files: maxFiles,
        fields: 100,
        fieldSize: 64 * 1024,
      },
    });
  } catch (error) {
    // busboy throws at once on a multipart type without a boundary (RFC 2046 §5.1.1 requires one).
    throw new UploadError(
      400,
      "bad_upload",
      `The upload could not be read (${(error as Error).message}): send it as multipart/form-data with a boundary, as browsers and curl -F do.`,
    );
  }
  const fields: Record<string, string> = {};
  // Every file part settles to a value, never a rejection: a failure that arrives while the
  // request is still streaming would otherwise be an unhandled rejection (Promise.all comes later).
  const parts: Promise<ReceivedFile | UploadError | { failed: unknown } | null>[] = [];
  // Every file the store kept, also those refused afterwards (an empty file), to remove them.
  const stored: ReceivedFile[] = [];
  let tooManyFiles = false;
  // Settles to what beforeFirstFile threw, or null.
  let gate: Promise<unknown> | undefined;

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
    gate ??= options.beforeFirstFile
      ? options.beforeFirstFile({ ...fields }).then(
          () => null,
          (refusal: unknown) => refusal ?? new Error("refused"),
        )
      : Promise.resolve(null);
    // Listening at once: a request cut off while the gate is pending errors the part.
    let partError: Error | undefined;
    const check = textCheck(fileName);
    file.on("error", (e) => {
      partError = e;
      // A cut-off request destroys the part (busboy) → the check → the store's write, which
      // removes its partial file.
      check.destroy(e);
    });
    parts.push(
      gate.then((refusal) => {
        if (refusal || partError) {
          file.resume(); // drain: nothing of it is stored
          return null;
        }
        return options.store.put(file.pipe(check), { maxBytes: options.maxBytes }).then(
          (blob) => {
            const received = { field, fileName, stored: blob };
            hold(blob.key);
            stored.push(received);
            if (blob.sizeBytes === 0)
              return new UploadError(
                422,
                "empty_file",
                `${fileName} is empty: choose the drive log file itself.`,
              );
            return received;
          },
          (error: unknown) => {
            file.resume(); // keep reading the request so the other parts still arrive
            return refusalOf(error, fileName, options.maxBytes);
          },
        );
      }),
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
  const results = await Promise.all(parts);
  const early = gate ? await gate : null;
  const refusal = early
    ? early
    : cutOff
      ? new UploadError(400, "upload_cut_off", "The upload was cut off: send it again.")
      : parseError
        ? new UploadError(
            400,
            "bad_upload",
            `The upload could not be read (${parseError.message}).`,
          )
        : (results.find((r): r is UploadError => r instanceof UploadError) ??
          results.find((r): r is { failed: unknown } => !!r && "failed" in r)?.failed ??
          (tooManyFiles
            ? new UploadError(413, "too_many_files", `At most ${maxFiles} files at once.`)
            : null));
  if (refusal) {
    await discardReceived(options.store, { files: stored });
    throw refusal;
  }
  // In the order the parts came (stored is in the order the writes finished).
  return { fields, files: results.filter((r): r is ReceivedFile => !!r && "stored" in r) };
}

function refusalOf(error: unknown, fileName: string, maxBytes: number) {
  if (error instanceof BlobTooLargeError) {
    return new UploadError(
      413,
      "too_large",
      `${fileName} is larger than the limit of ${formatBytes(maxBytes)}.`,
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
}

// Keys of files received by uploads of this process that are not yet recorded or refused:
// content-addressed, so two uploads of the same bytes share one file, and a refused one must
// not remove it while the other still needs it. Across app instances the store's modified time
// does this job (a put of existing content marks it fresh; see discardReceived).
const holds = new Map<string, number>();

function hold(key: string) {
  holds.set(key, (holds.get(key) ?? 0) + 1);
}

function release(key: string): boolean {
  const left = (holds.get(key) ?? 1) - 1;
  if (left > 0) holds.set(key, left);
  else holds.delete(key);
  return left <= 0;
}

/** The upload's files are recorded (their drive logs reference them): nothing to remove. */
export function keepReceived(received: Pick<ReceivedUpload, "files">): void {
  for (const f of received.files) release(f.stored.key);
}

/**
 * The upload was refused after its files were stored: removes each file this upload wrote,
 * unless another upload of the same bytes holds it now (here or, by the file's modified time,
 * on another instance). Never throws: what it cannot remove the periodic sweep takes later.
 */
export async function discardReceived(
  store: BlobStore,
  received: Pick<ReceivedUpload, "files">,
): Promise<void> {
  const byKey = new Map<string, StoredBlob[]>();
  for (const f of received.files)
    byKey.set(f.stored.key, [...(byKey.get(f.stored.key) ?? []), f.stored]);
  for (const [key, copies] of byKey) {
    let free = false;
    for (const _ of copies) free = release(key);
    // A file that was there before this upload may belong to a drive log: never ours to remove.
    if (!free || !copies.some((c) => c.created)) continue;
    const last = copies.reduce((a, b) => (b.modifiedAt >= a.modifiedAt ? b : a));
    // Not if anything put the same content since (another upload, maybe on another instance).
    await store
      .remove(key, { ifNotModifiedAfter: last.modifiedAt, ifVersion: last.version })
      .catch(() => {});
  }
}

/**
 * Passes bytes through, refusing a file that is neither CSV text nor ASAM MDF4. MDF4 is told by
 * its first 8 bytes (sniffFormat: the identification block's file id) and passes whole; any
 * other file must be text: no NUL byte in the first 64 kB (binary formats have them; CSV never
 * does) and a line break in them (a header row).
 */
function textCheck(fileName: string): Transform {
  let seen = 0;
  let sawNewline = false;
  let head = Buffer.alloc(0); // the first bytes, until there are 8 to sniff
  let mdf4: boolean | undefined;
  const notText = () =>
    new UploadError(
      422,
      "not_text",
      `${fileName} is neither CSV text nor an ASAM MDF4 file: upload the drive log as CSV text or as ASAM MDF4 (.mf4).`,
    );
  return new Transform({
    transform(chunk: Buffer, _enc, done) {
      if (mdf4 === undefined) {
        head = Buffer.concat([head, chunk.subarray(0, 8 - head.length)]);
        if (head.length < 8) {
          // Too short to tell yet: a NUL already rules out text, else wait for more.
          if (head.includes(0)) return done(notText());
        } else mdf4 = sniffFormat(head) === "mdf4";
      }
      if (mdf4) return done(null, chunk);
      if (seen < SNIFF_BYTES) {
        const part = chunk.subarray(0, SNIFF_BYTES - seen);
        if (part.includes(0)) return done(notText());
        if (part.includes(10) || part.includes(13)) sawNewline = true;
        seen += part.length;
        if (seen >= SNIFF_BYTES && !sawNewline) {
          done(
            new UploadError(
              422,
              "no_header_row",
              `${fileName} has no line break in its first 64 kB: it does not look like a CSV file with a header row (nor like an ASAM MDF4 file).`,
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
