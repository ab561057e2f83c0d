/**
 * The comparison of the spooled ingest (ingest-samples.ts) with the batch ingest, for
 * app/lib/signal/ingest-samples*.test.ts: the SampleSource read back in several window sizes
 * holds every sample of the DriveLog bit for bit, and the same sampleRateHz, sections, source
 * and warnings; a refusal has the same error and leaves no temporary folder. The spool folders
 * are looked for in os.tmpdir(): each test file points TMPDIR at a folder of its own
 * (useOwnTmpdir), so other processes' files never count.
 */
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, expect } from "vitest";
import { ingestSamples } from "../../app/lib/signal/ingest-samples.ts";
import { createIngester, type IngestOptions } from "../../app/lib/signal/ingest.ts";
import type { SampleSource } from "../../app/lib/signal/sample-source.ts";
import type { DriveLog, Outcome } from "../../app/lib/signal/types.ts";

/**
 * Points TMPDIR (os.tmpdir() reads it on every call) at a fresh folder for the file's tests and
 * removes it afterwards; returns a getter for a work folder beside it.
 */
export function useOwnTmpdir(): () => string {
  let work = "";
  const old = process.env.TMPDIR;
  beforeAll(() => {
    work = mkdtempSync(join(tmpdir(), "ingest-samples-test-"));
    process.env.TMPDIR = mkdtempSync(join(work, "spool-"));
  });
  afterAll(() => {
    process.env.TMPDIR = old;
    rmSync(work, { recursive: true, force: true });
  });
  return () => work;
}

const spoolFolders = () => readdirSync(tmpdir()).filter((f) => f.startsWith("twistlog-samples-"));

/** Counts samples that differ (Object.is) between the source read in windows of `size` and the log. */
function mismatches(src: SampleSource, log: DriveLog, size: number): number {
  let bad = 0;
  for (let a = 0; a < src.length; a += size) {
    const w = src.read(a, a + size);
    for (let i = 0; i < w.timeS.length; i++) {
      if (!Object.is(w.timeS[i], log.timeS[a + i])) bad++;
      if (!Object.is(w.crankRadS[i], log.crankRadS[a + i])) bad++;
      if (!Object.is(w.gearboxRadS[i], log.gearboxRadS[a + i])) bad++;
    }
  }
  return bad;
}

/** The spooled outcome equals the batch one (method at the top); closes the source. */
export function expectSame(spooled: Outcome<SampleSource>, batch: Outcome<DriveLog>): void {
  try {
    expect(spooled.warnings).toStrictEqual(batch.warnings);
  } catch (e) {
    if (spooled.ok) spooled.value.close(); // so the next case starts with no folder
    throw e;
  }
  if (!batch.ok || !spooled.ok) {
    expect(spooled.ok).toBe(batch.ok);
    if (!batch.ok && !spooled.ok) expect(spooled.error).toStrictEqual(batch.error);
    expect(spoolFolders()).toEqual([]); // a refused log leaves no file
    return;
  }
  const src = spooled.value;
  try {
    const { timeS, crankRadS: _c, gearboxRadS: _g, extra: _x, ...meta } = batch.value;
    const { length, read: _r, close: _cl, ...srcMeta } = src;
    expect(length).toBe(timeS.length);
    expect(srcMeta).toStrictEqual(meta);
    for (const size of [1, 7, 4096, 1 << 20]) {
      if (size === 1 && length > 5000) continue; // one sample at a time: small logs only
      expect(mismatches(src, batch.value, size)).toBe(0);
    }
    expect(spoolFolders().length).toBe(1);
  } finally {
    src.close(); // also when a check failed, so the next case starts with no folder
  }
  expect(spoolFolders()).toEqual([]);
  expect(() => src.read(0, 1)).toThrow(/closed/);
}

/** The text in chunks of the given sizes (cycled), as a stream would deliver it. */
export async function* chunked(text: string | Uint8Array, sizes: number[]) {
  const bytes = typeof text === "string" ? new TextEncoder().encode(text) : text;
  let k = 0;
  for (let s = 0; s < bytes.length; k++) {
    const n = Math.max(1, sizes[k % sizes.length]!);
    yield bytes.slice(s, s + n);
    s += n;
  }
}

/** The batch ingest fed the same chunks (a line cut by a chunk is read on the careful path). */
export async function batchOf(text: string | Uint8Array, options: IngestOptions, sizes: number[]) {
  const ing = createIngester(options);
  for await (const c of chunked(text, sizes)) ing.push(c);
  return ing.finish();
}

export async function sameOnText(
  text: string | Uint8Array,
  options: IngestOptions = {},
  sizes = [1 << 18],
) {
  expectSame(
    await ingestSamples(chunked(text, sizes), options),
    await batchOf(text, options, sizes),
  );
}
