import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { afterAll, describe, expect, it } from "vitest";
import { ingestCsv } from "./ingest.ts";
import { ingestFile, ingestStream } from "./ingest-stream.ts";

const dir = mkdtempSync(join(tmpdir(), "twistlog-ingest-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// A log larger than one 256 KiB read, so the file path goes through several chunks.
function text(rows: number): string {
  const comma = (x: number) => String(x).replace(".", ",");
  const lines = ["t_ms;engine_speed_rad_s;gearbox_speed_rad_s"];
  for (let i = 0; i < rows; i++) {
    const c = (100 + Math.sin(i / 9)).toFixed(6);
    const g = (99 + Math.cos(i / 9)).toFixed(6);
    lines.push(`${comma(i * 0.5)};${comma(Number(c))};${comma(Number(g))}`);
  }
  return `${lines.join("\n")}\n`;
}

describe("stream adapter", () => {
  const body = text(40_000);
  const reference = ingestCsv(body);
  it("a file read in chunks gives the same log as the whole text", async () => {
    const path = join(dir, "log.csv");
    writeFileSync(path, body);
    const fractions: number[] = [];
    const r = await ingestFile(path, {}, (f) => fractions.push(f));
    expect(r.ok && reference.ok).toBe(true);
    if (!r.ok || !reference.ok) return;
    expect(r.value.timeS.length).toBe(40_000);
    expect([...r.value.gearboxRadS]).toEqual([...reference.value.gearboxRadS]);
    expect(r.value.source).toEqual(reference.value.source);
    expect(fractions.length).toBeGreaterThan(1);
    expect(fractions.at(-1)).toBe(1);
  });
  it("a readable of string pieces", async () => {
    const pieces = body.match(/[\s\S]{1,5000}/g) ?? [];
    const r = await ingestStream(Readable.from(pieces));
    expect(r.ok && reference.ok && [...r.value.crankRadS]).toEqual(
      reference.ok && [...reference.value.crankRadS],
    );
  });
  it("a missing file and a folder are error values", async () => {
    expect(await ingestFile(join(dir, "missing.csv"))).toMatchObject({
      ok: false,
      error: { code: "file_not_found" },
    });
    expect(await ingestFile(dir)).toMatchObject({ ok: false, error: { code: "read_failed" } });
  });
  it("a stream that fails is read_failed, not a throw", async () => {
    const failing = new Readable({
      read() {
        this.destroy(new Error("disk went away"));
      },
    });
    const r = await ingestStream(failing);
    expect(r).toMatchObject({ ok: false, error: { code: "read_failed" } });
  });
});
