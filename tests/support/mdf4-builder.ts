/**
 * A small MDF4 writer for tests and the bench: blocks laid out as ASAM MDF 4.2 (ASAM e.V.)
 * describes them (24-byte header "##XX", reserved, length, link count; links; data — from
 * memory of the standard, cross-checked by reading the independent reference files in
 * tests/fixtures/mdf4 with the same layouts). Not a test oracle: tests state their expected
 * values from the standard's formulas, never from this writer. Blocks are written children
 * first, so every link points to a block already placed.
 */
import { deflateSync } from "node:zlib";

export interface CnSpec {
  next?: number;
  name: string;
  unit?: string;
  comment?: string;
  cc?: number;
  /** 0 fixed, 2 master, 3 virtual master. */
  type?: number;
  sync?: number;
  /** 0/1 uint LE/BE, 2/3 int LE/BE, 4/5 float LE/BE. */
  dataType: number;
  bitOffset?: number;
  byteOffset: number;
  bitCount: number;
  flags?: number;
  invalBitPos?: number;
}

export class MdfBuilder {
  private parts: Buffer[] = [];
  private size = 0;

  constructor(unfinished = false) {
    const id = Buffer.alloc(64);
    id.write(unfinished ? "UnFinMF " : "MDF     ", 0, "latin1");
    id.write("4.10    ", 8, "latin1");
    id.write("twtest  ", 16, "latin1");
    id.writeUInt16LE(410, 28);
    this.add(id);
    this.block("##HD", [0, 0, 0, 0, 0, 0], Buffer.alloc(32)); // at 64; links set by setHd
  }

  private add(b: Buffer): number {
    const at = this.size;
    this.parts.push(b);
    this.size += b.length;
    return at;
  }

  /** Appends a block (padded to 8 bytes) and returns its offset. */
  block(id: string, links: number[], data: Uint8Array): number {
    const len = 24 + 8 * links.length + data.length;
    const b = Buffer.alloc(Math.ceil(len / 8) * 8);
    b.write(id, 0, "latin1");
    b.writeBigUInt64LE(BigInt(len), 8);
    b.writeBigUInt64LE(BigInt(links.length), 16);
    links.forEach((l, i) => b.writeBigUInt64LE(BigInt(l), 24 + 8 * i));
    b.set(data, 24 + 8 * links.length);
    return this.add(b);
  }

  /** Sets link `index` of the header block (0 = first data group, 5 = comment). */
  setHd(index: number, value: number): void {
    this.parts[1]!.writeBigUInt64LE(BigInt(value), 24 + 8 * index);
  }

  text(s: string, id = "##TX"): number {
    return s === "" ? 0 : this.block(id, [], Buffer.from(`${s}\0`, "utf8"));
  }

  dg(cgFirst: number, data: number, recIdSize = 0, next = 0): number {
    const d = Buffer.alloc(8);
    d.writeUInt8(recIdSize, 0);
    return this.block("##DG", [next, cgFirst, data, 0], d);
  }

  cg(o: {
    cnFirst: number;
    name?: string;
    recordId?: number;
    cycles: number;
    dataBytes: number;
    invalBytes?: number;
    flags?: number;
    next?: number;
  }): number {
    const d = Buffer.alloc(32);
    d.writeBigUInt64LE(BigInt(o.recordId ?? 0), 0);
    d.writeBigUInt64LE(BigInt(o.cycles), 8);
    d.writeUInt16LE(o.flags ?? 0, 16);
    d.writeUInt32LE(o.dataBytes, 24);
    d.writeUInt32LE(o.invalBytes ?? 0, 28);
    const name = this.text(o.name ?? "");
    return this.block("##CG", [o.next ?? 0, o.cnFirst, name, 0, 0, 0], d);
  }

  cn(o: CnSpec): number {
    const d = Buffer.alloc(72);
    d.writeUInt8(o.type ?? 0, 0);
    d.writeUInt8(o.sync ?? 0, 1);
    d.writeUInt8(o.dataType, 2);
    d.writeUInt8(o.bitOffset ?? 0, 3);
    d.writeUInt32LE(o.byteOffset, 4);
    d.writeUInt32LE(o.bitCount, 8);
    d.writeUInt32LE(o.flags ?? 0, 12);
    d.writeUInt32LE(o.invalBitPos ?? 0, 16);
    const name = this.text(o.name);
    const unit = this.text(o.unit ?? "");
    const comment = o.comment
      ? this.text(`<CNcomment><TX>${o.comment}</TX></CNcomment>`, "##MD")
      : 0;
    return this.block("##CN", [o.next ?? 0, 0, name, 0, o.cc ?? 0, 0, unit, comment], d);
  }

  /** The usual time master: float64 seconds at byte 0 of each record, then channel `next`. */
  timeMaster(next = 0, name = "t"): number {
    return this.cn({
      next,
      name,
      unit: "s",
      type: 2,
      sync: 1,
      dataType: 4,
      byteOffset: 0,
      bitCount: 64,
    });
  }

  cc(type: number, vals: number[], unit = ""): number {
    const d = Buffer.alloc(24 + 8 * vals.length);
    d.writeUInt8(type, 0);
    d.writeUInt16LE(vals.length, 6);
    vals.forEach((v, i) => d.writeDoubleLE(v, 24 + 8 * i));
    return this.block("##CC", [0, this.text(unit), 0, 0], d);
  }

  dt(data: Uint8Array): number {
    return this.block("##DT", [], data);
  }

  /** A DZ block of `data` (deflate; transposed with `columns` when given). */
  dz(data: Uint8Array, columns = 0, packed?: Uint8Array, declared = data.length): number {
    let src = Buffer.from(data);
    if (columns > 0) {
      const rows = Math.floor(data.length / columns);
      src = Buffer.from(data);
      for (let r = 0; r < rows; r++)
        for (let c = 0; c < columns; c++) src[c * rows + r] = data[r * columns + c]!;
    }
    const z = packed ?? deflateSync(src);
    const d = Buffer.alloc(24 + z.length);
    d.write("DT", 0, "latin1");
    d.writeUInt8(columns > 0 ? 1 : 0, 2);
    d.writeUInt32LE(columns, 4);
    d.writeBigUInt64LE(BigInt(declared), 8);
    d.writeBigUInt64LE(BigInt(z.length), 16);
    d.set(z, 24);
    return this.block("##DZ", [], d);
  }

  dl(blocks: number[], next = 0): number {
    const d = Buffer.alloc(8 + 8 * blocks.length);
    d.writeUInt32LE(blocks.length, 4);
    return this.block("##DL", [next, ...blocks], d);
  }

  hl(dlFirst: number): number {
    const d = Buffer.alloc(8);
    return this.block("##HL", [dlFirst], d);
  }

  bytes(): Buffer {
    return Buffer.concat(this.parts);
  }
}
