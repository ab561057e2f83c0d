/**
 * The temporary files behind a spooled SampleSource (sample-source.ts; docs/signal-ingest.md,
 * "Spooled ingest"): one file per channel (time in s, crank and gearbox in rad/s) of
 * little-endian Float64 values, appended through a small buffer while a log is read and read
 * back by position. They live in a folder of their own under os.tmpdir(), removed by close(),
 * by discard() on an error, and at process exit for any still open.
 */
import { closeSync, mkdtempSync, openSync, readSync, rmSync, writeSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { SampleSource, SampleWindow } from "./sample-source.ts";

/** Samples buffered per channel before a write (512 KiB each). */
const BUFFER_SAMPLES = 1 << 16;

/** Folders of spools not yet removed, for the exit hook. */
const live = new Set<string>();
let hooked = false;
function removeAll(): void {
  for (const dir of live) rmSync(dir, { recursive: true, force: true });
  live.clear();
}

/** The three channel files of a log being written, then read. */
export class SampleSpool {
  readonly dir: string;
  private readonly fds: number[];
  private readonly bufs = [0, 1, 2].map(() => new Float64Array(BUFFER_SAMPLES));
  private readonly filled = [0, 0, 0];
  /** Values written per channel (buffered ones included). */
  readonly counts = [0, 0, 0];
  private open = true;

  constructor() {
    if (!hooked) {
      process.once("exit", removeAll);
      hooked = true;
    }
    this.dir = mkdtempSync(join(tmpdir(), "twistlog-samples-"));
    live.add(this.dir);
    try {
      this.fds = ["time", "crank", "gearbox"].map((n) =>
        openSync(join(this.dir, `${n}.f64`), "w+"),
      );
    } catch (e) {
      this.discard();
      throw e;
    }
  }

  /** Samples written so far (the time channel's count). */
  get length(): number {
    return this.counts[0]!;
  }

  /** Appends values[from, to) to channel k (0 time, 1 crank, 2 gearbox). */
  append(k: number, values: Float64Array, from: number, to: number): void {
    const buf = this.bufs[k]!;
    let i = from;
    while (i < to) {
      const take = Math.min(to - i, BUFFER_SAMPLES - this.filled[k]!);
      buf.set(values.subarray(i, i + take), this.filled[k]!);
      this.filled[k]! += take;
      i += take;
      if (this.filled[k] === BUFFER_SAMPLES) this.flushChannel(k);
    }
    this.counts[k]! += to - from;
  }

  private flushChannel(k: number): void {
    const bytes = this.filled[k]! * 8;
    const view = new Uint8Array(this.bufs[k]!.buffer, 0, bytes);
    for (let done = 0; done < bytes;) done += writeSync(this.fds[k]!, view, done, bytes - done);
    this.filled[k] = 0;
  }

  /** Writes what is buffered; reads see every value appended before. */
  flush(): void {
    for (let k = 0; k < 3; k++) if (this.filled[k]! > 0) this.flushChannel(k);
  }

  /** Values [start, end) of channel k, read from the file (flush first). */
  readChannel(k: number, start: number, end: number): Float64Array {
    if (!this.open) throw new Error("the sample source is closed");
    const out = new Float64Array(Math.max(0, end - start));
    const bytes = new Uint8Array(out.buffer);
    for (let done = 0; done < bytes.length;) {
      const got = readSync(this.fds[k]!, bytes, done, bytes.length - done, start * 8 + done);
      if (got === 0) throw new Error("the spooled samples end early");
      done += got;
    }
    return out;
  }

  /** Removes the files (after an error, or when a source is closed). Safe to call twice. */
  discard(): void {
    if (!this.open) return;
    this.open = false;
    for (const fd of this.fds ?? []) closeSync(fd);
    rmSync(this.dir, { recursive: true, force: true });
    live.delete(this.dir);
  }

  /**
   * The SampleSource over the spooled samples (flushes first). `meta` is the DriveLog's metadata
   * (sampleRateHz, sections, source); close() removes the files.
   */
  toSource(meta: Omit<SampleSource, "length" | "read" | "close">): SampleSource {
    this.flush();
    const n = this.length;
    return {
      ...meta,
      length: n,
      read: (start, end): SampleWindow => {
        const a = Math.max(0, Math.min(n, start));
        const b = Math.max(a, Math.min(n, end));
        return {
          timeS: this.readChannel(0, a, b),
          crankRadS: this.readChannel(1, a, b),
          gearboxRadS: this.readChannel(2, a, b),
        };
      },
      close: () => this.discard(),
    };
  }
}
