/**
 * Random access to an MDF4 file by offset (node:fs/promises FileHandle): every read is bounded,
 * so a file of any size costs only what is read from it. Small reads of the structure (block
 * headers, names, conversions sit scattered over the file) go through a cache of a few 64 KiB
 * pages: a file with thousands of channels then needs a few dozen system calls, not thousands.
 */
import { open, type FileHandle } from "node:fs/promises";

/** A structural problem, thrown inside the reader and turned into an Outcome at its edge (index.ts). */
export class MdfFault extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

const PAGE = 1 << 16;
const PAGES = 16; // 1 MiB of cache at most
/** Largest single read; longer reads are a programming error (callers read data in pieces). */
export const MAX_READ = 1 << 26;

export class MdfFile {
  /**
   * The file starts "UnFinMF ": its logger stopped before finalising it, so the last DT block
   * may claim a length past the end of the file (the standard's unfinalised-file flags; from
   * memory). Set by readStructure; the data reader then reads that block to the file's end.
   */
  unfinished = false;
  private pages = new Map<number, Uint8Array>();
  private constructor(
    private fh: FileHandle,
    readonly size: number,
  ) {}

  static async open(path: string): Promise<MdfFile> {
    const fh = await open(path, "r");
    try {
      const { size } = await fh.stat();
      return new MdfFile(fh, size);
    } catch (e) {
      await fh.close();
      throw e;
    }
  }

  async close(): Promise<void> {
    await this.fh.close();
  }

  /** Exactly `length` bytes at `offset`, or a `mdf4_truncated` fault naming what was read. */
  async read(offset: number, length: number, what: string): Promise<Uint8Array> {
    if (length > MAX_READ)
      throw new MdfFault("mdf4_block_too_long", `${what} is too long to read (${length} bytes)`);
    if (offset < 0 || offset + length > this.size)
      throw new MdfFault(
        "mdf4_truncated",
        `${what} runs past the end of the file (bytes ${offset}–${offset + length}, the file has ${this.size}); the file is truncated or damaged`,
      );
    if (length <= PAGE && Math.floor(offset / PAGE) === Math.floor((offset + length - 1) / PAGE)) {
      const page = await this.page(Math.floor(offset / PAGE));
      const at = offset % PAGE;
      return page.subarray(at, at + length);
    }
    const buf = new Uint8Array(length);
    let got = 0;
    while (got < length) {
      const { bytesRead } = await this.fh.read(buf, got, length - got, offset + got);
      if (bytesRead === 0) throw new MdfFault("mdf4_truncated", `${what}: the file ended early`);
      got += bytesRead;
    }
    return buf;
  }

  /** `length` bytes at `offset` into `target` from 0 (a buffer the caller reuses); faults as read. */
  async readInto(
    target: Uint8Array,
    offset: number,
    length: number,
    what: string,
  ): Promise<Uint8Array> {
    if (offset < 0 || offset + length > this.size || length > target.length)
      throw new MdfFault(
        "mdf4_truncated",
        `${what} runs past the end of the file; the file is truncated or damaged`,
      );
    let got = 0;
    while (got < length) {
      const { bytesRead } = await this.fh.read(target, got, length - got, offset + got);
      if (bytesRead === 0) throw new MdfFault("mdf4_truncated", `${what}: the file ended early`);
      got += bytesRead;
    }
    return target.subarray(0, length);
  }

  private async page(index: number): Promise<Uint8Array> {
    const hit = this.pages.get(index);
    if (hit) {
      // Re-insert so the map's order is least recently used first.
      this.pages.delete(index);
      this.pages.set(index, hit);
      return hit;
    }
    const start = index * PAGE;
    const len = Math.min(PAGE, this.size - start);
    const buf = new Uint8Array(len);
    let got = 0;
    while (got < len) {
      const { bytesRead } = await this.fh.read(buf, got, len - got, start + got);
      if (bytesRead === 0) break;
      got += bytesRead;
    }
    if (this.pages.size >= PAGES) this.pages.delete(this.pages.keys().next().value as number);
    this.pages.set(index, buf);
    return buf;
  }
}
