/**
 * Damaged and hostile MDF4 files: every problem is an Outcome error with a code and a message
 * naming the block and its file offset — never a throw, never a hang, bounded memory. The
 * damaged files are made from the independent reference files (tests/fixtures/mdf4) by the
 * patches below; block offsets as those files lay them out (listed in their README's tree).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { deflateSync } from "node:zlib";
import fc from "fast-check";
import { afterAll, describe, expect, it } from "vitest";
import { MdfBuilder } from "../../../../tests/support/mdf4-builder.ts";
import { ingestMdf4File, listMdf4Channels } from "./index.ts";

const fixtures = join(import.meta.dirname, "../../../../tests/fixtures/mdf4");
const dir = mkdtempSync(join(tmpdir(), "twistlog-test-badmdf-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const fixture = (name: string) => readFileSync(join(fixtures, `${name}.mf4`));
const PICK = { crankColumn: "EngSpd", gearboxColumn: "GbxInpShaftSpd" };

let n = 0;
function save(bytes: Uint8Array): string {
  const path = join(dir, `bad-${n++}.mf4`);
  writeFileSync(path, bytes);
  return path;
}

async function errorOf(bytes: Uint8Array) {
  const r = await ingestMdf4File(save(bytes), PICK);
  expect(r.ok).toBe(false);
  return r.ok ? { code: "", message: "" } : r.error;
}

/** Offsets in drive-log-plain.mf4: HD 64; Engine DG 191320 → CG 79192, its DT 79296 (112024 bytes). */
describe("bad MDF4 input gives a clear error with the block's offset", () => {
  it("a truncated file", async () => {
    // The reference files keep their structure at the end: a cut loses the first data group.
    const e = await errorOf(fixture("drive-log-plain").subarray(0, 150_000));
    expect(e.code).toBe("mdf4_bad_link");
    expect(e.message).toContain("HD block at offset 64");
    expect(e.message).toContain("truncated");
    // Structure first, data last (as loggers write): the cut falls inside the DT block.
    const b = new MdfBuilder();
    const t = b.timeMaster();
    const dg = b.dg(b.cg({ cnFirst: t, cycles: 1000, dataBytes: 8 }), 0);
    b.setHd(0, dg);
    const dt = b.dt(Buffer.alloc(8000));
    const whole = b.bytes();
    whole.writeBigUInt64LE(BigInt(dt), dg + 24 + 16); // the group's data link
    const r = await listMdf4Channels(save(whole.subarray(0, dt + 4000)));
    expect(!r.ok && r.error.code).toBe("mdf4_truncated");
    expect(!r.ok && r.error.message).toContain(`DT block at offset ${dt}`);
  });

  it("a link pointing outside the file", async () => {
    const b = Buffer.from(fixture("drive-log-plain"));
    b.writeBigUInt64LE(BigInt(b.length + 4096), 64 + 24); // HD's first data group
    const e = await errorOf(b);
    expect(e.code).toBe("mdf4_bad_link");
    expect(e.message).toContain("HD block at offset 64");
  });

  it("a block with a wrong id", async () => {
    const b = Buffer.from(fixture("drive-log-plain"));
    b.write("##XY", 79192, "latin1"); // the Engine channel group
    const e = await errorOf(b);
    expect(e.code).toBe("mdf4_wrong_block");
    expect(e.message).toContain("offset 79192");
  });

  it("a DZ block that does not inflate", async () => {
    const b = Buffer.from(fixture("drive-log-deflate"));
    b.fill(0xff, 49800 + 48 + 2, 49800 + 48 + 40); // the Engine group's DZ, past the zlib header
    const e = await errorOf(b);
    expect(e.code).toBe("mdf4_dz_corrupt");
    expect(e.message).toContain("DZ block at offset 49800");
  });

  it("a zip bomb: a DZ block that inflates far beyond its declared size is refused", async () => {
    const b = new MdfBuilder();
    const t = b.timeMaster();
    // 32 MiB of zeros pack into about 32 kB; the block declares 800 bytes (100 records).
    const bomb = deflateSync(Buffer.alloc(1 << 25), { level: 9 });
    const dz = b.dz(new Uint8Array(0), 0, bomb, 800);
    b.setHd(0, b.dg(b.cg({ cnFirst: t, cycles: 100, dataBytes: 8 }), dz));
    const r = await listMdf4Channels(save(b.bytes()));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.code).toBe("mdf4_dz_too_large");
    expect(r.error.message).toContain(`DZ block at offset ${dz}`);
  });

  it("absurd lengths, counts and link cycles", async () => {
    const plain = fixture("drive-log-plain");
    const long = Buffer.from(plain);
    long.writeBigUInt64LE(1n << 40n, 77808 + 8); // a CN block 1 TiB long
    expect((await errorOf(long)).message).toContain("offset 77808");
    const loop = Buffer.from(plain);
    loop.writeBigUInt64LE(79000n, 78776 + 24); // a channel's "next" back to the first channel
    const e = await errorOf(loop);
    expect(e.code).toBe("mdf4_link_cycle");
    expect(e.message).toContain("offset 79000");
    const dz = Buffer.from(fixture("drive-log-deflate"));
    dz.writeBigUInt64LE(1n << 50n, 49800 + 24 + 8); // declared original size 1 PiB
    expect(await errorOf(dz)).toMatchObject({ code: "mdf4_bad_length" });
    // A cycle count of 2^50 allocates nothing absurd: the data hold 8000 records, so 8000 it is.
    const cycles = Buffer.from(plain);
    cycles.writeBigUInt64LE(1n << 50n, 79192 + 24 + 48 + 8);
    const r = await ingestMdf4File(save(cycles), PICK);
    expect(r.ok && r.value.source.rows).toBe(7999);
  });

  it("an unfinalised file's last DT block may claim too much: read to the end of the file", async () => {
    const file = (unfinished: boolean) => {
      const b = new MdfBuilder(unfinished);
      const t = b.timeMaster();
      const data = Buffer.alloc(8 * 100);
      for (let i = 0; i < 100; i++) data.writeDoubleLE(i / 100, 8 * i);
      const dg = b.dg(b.cg({ cnFirst: t, cycles: 0, dataBytes: 8 }), 0);
      b.setHd(0, dg);
      const dt = b.dt(data);
      const bytes = b.bytes();
      bytes.writeBigUInt64LE(BigInt(dt), dg + 24 + 16);
      bytes.writeBigUInt64LE(1n << 32n, dt + 8); // the length a logger leaves before finalising
      return save(bytes);
    };
    const open = await listMdf4Channels(file(true));
    // Cycle count 0 (never updated): the 100 records written are found in the data.
    expect(open.ok && open.value[0]?.samples).toBe(100);
    expect(open.ok && open.warnings[0]?.message).toContain("not finalised");
    const closed = await listMdf4Channels(file(false));
    expect(!closed.ok && closed.error.code).toBe("mdf4_truncated");
    // A finalised file's cycle count rules: 100 records written, 60 declared, 60 read.
    const b = new MdfBuilder();
    const t = b.timeMaster();
    b.setHd(0, b.dg(b.cg({ cnFirst: t, cycles: 60, dataBytes: 8 }), b.dt(Buffer.alloc(800))));
    const padded = await listMdf4Channels(save(b.bytes()));
    expect(padded.ok && padded.value[0]?.samples).toBe(60);
  });

  it("not MDF 4 at all, or MDF 3", async () => {
    const v3 = Buffer.from(fixture("types"));
    v3.writeUInt16LE(330, 28);
    expect(await errorOf(v3)).toMatchObject({ code: "mdf4_version" });
    expect(await errorOf(Buffer.from("MDF     4.10"))).toMatchObject({ code: "mdf4_truncated" });
  });
});

describe("random damage never throws out of the reader (property-based)", () => {
  const files = ["types", "drive-log-transposed", "drive-log-unsorted"].map(fixture);
  const damaged = fc
    .record({
      file: fc.integer({ min: 0, max: files.length - 1 }),
      cut: fc.option(fc.double({ min: 0, max: 1, noNaN: true })),
      flips: fc.array(
        fc.tuple(fc.double({ min: 0, max: 1, noNaN: true }), fc.integer({ min: 1, max: 255 })),
        { maxLength: 8 },
      ),
    })
    .map(({ file, cut, flips }) => {
      const src = files[file]!;
      const b = Buffer.from(
        src.subarray(0, cut === null ? src.length : Math.floor(cut * src.length)),
      );
      for (const [at, x] of flips) if (b.length > 0) b[Math.floor(at * b.length) % b.length]! ^= x;
      return b;
    });

  it("truncations and byte flips: an Outcome every time, errors with a code and a sentence", async () => {
    await fc.assert(
      fc.asyncProperty(damaged, async (bytes) => {
        const path = save(bytes);
        for (const r of [await listMdf4Channels(path), await ingestMdf4File(path)]) {
          expect(typeof r.ok).toBe("boolean");
          if (!r.ok) {
            expect(r.error.code).toMatch(/^[a-z0-9_]+$/);
            expect(r.error.message.length).toBeGreaterThan(10);
          }
        }
        rmSync(path);
      }),
      { numRuns: 100 },
    );
  });
});
