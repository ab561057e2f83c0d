/**
 * A data group's data as one stream of bytes, read piece by piece (ASAM MDF 4.2, ASAM e.V.;
 * layouts from memory of the standard). The group's data link points to one DT block (records
 * as stored), one DZ block (the same, deflate-compressed), a DL data list (a chain of lists of
 * DT/DZ blocks, concatenated in order) or an HL header list in front of a DL. DT data are read
 * in 1 MiB pieces; a DZ block is inflated whole — at most its declared original size
 * (`maxOutputLength`), so a block that inflates further (a "zip bomb") is refused, never
 * allowed to fill the memory — and its transposition (zip type 1) undone.
 */
import { inflateSync } from "node:zlib";
import { chain, needData, readBlock, readHeader, u64 } from "./blocks.ts";
import { MdfFault, type MdfFile } from "./file.ts";

type Piece =
  | { kind: "dt"; offset: number; start: number; length: number }
  | {
      kind: "dz";
      offset: number;
      start: number;
      packed: number;
      length: number;
      transposed: boolean;
      columns: number;
    };

/** Largest DZ block, packed or inflated (loggers write blocks of a few MiB). */
export const MAX_DZ_BYTES = 1 << 26;
const CHUNK = 1 << 20;
const DATA_IDS = ["##DT", "##DZ", "##DL", "##HL"];

/** The pieces of a data group's data, in order, and their total length in bytes. */
export async function dataPieces(
  file: MdfFile,
  link: number,
  from: string,
): Promise<{ pieces: Piece[]; total: number }> {
  const pieces: Piece[] = [];
  if (link !== 0) await collect(file, link, from, pieces, 0);
  return { pieces, total: pieces.reduce((s, p) => s + p.length, 0) };
}

async function collect(
  file: MdfFile,
  at: number,
  from: string,
  out: Piece[],
  depth: number,
): Promise<void> {
  const ids = [...DATA_IDS, "##DV", "##DI", "##LD", "##SD", "##RD"];
  const h = await readHeader(file, at, ids, from, file.unfinished);
  const name = `${h.id.slice(2)} block at offset ${at}`;
  if (!DATA_IDS.includes(h.id))
    throw new MdfFault(
      "mdf4_unsupported",
      `${name}: ${h.id.slice(2)} data (linked from ${from}) cannot be read; save the file with plain record data`,
    );
  if (h.id === "##DT") {
    if (h.length < 24 + 8 * h.linkCount)
      throw new MdfFault("mdf4_truncated", `${name} is cut off inside its header`);
    out.push({
      kind: "dt",
      offset: at,
      start: at + 24 + 8 * h.linkCount,
      length: h.length - 24 - 8 * h.linkCount,
    });
    return;
  }
  if (h.id === "##DZ") {
    out.push(await dzPiece(file, at, h.length, h.linkCount));
    return;
  }
  if (depth > 0)
    throw new MdfFault(
      "mdf4_wrong_block",
      `${name} inside a data list (linked from ${from}) is not allowed`,
    );
  if (h.id === "##HL") {
    const hl = await readBlock(file, at, ["##HL"], from);
    needData(hl, 0, 1);
    return collect(file, hl.links[0] ?? 0, name, out, 0);
  }
  for await (const dl of chain(file, at, ["##DL"], from)) {
    needData(dl, 8, 1);
    const count = dl.data.getUint32(4, true);
    const dlName = `DL block at offset ${dl.offset}`;
    if (count > dl.links.length - 1)
      throw new MdfFault(
        "mdf4_bad_length",
        `${dlName} lists ${count} blocks but has ${dl.links.length - 1} links`,
      );
    for (let i = 1; i <= count; i++) {
      const l = dl.links[i] ?? 0;
      if (l === 0) throw new MdfFault("mdf4_bad_link", `${dlName}: entry ${i} links to nothing`);
      await collect(file, l, dlName, out, 1);
    }
  }
}

async function dzPiece(file: MdfFile, at: number, length: number, links: number): Promise<Piece> {
  const name = `DZ block at offset ${at}`;
  const start = at + 24 + 8 * links;
  const head = await file.read(start, 24, name);
  const d = new DataView(head.buffer, head.byteOffset, 24);
  const b = { id: "##DZ", offset: at, length, links: [], data: d };
  const org = String.fromCharCode(head[0]!, head[1]!);
  const zip = d.getUint8(2);
  const columns = d.getUint32(4, true);
  const orgLength = u64(b, 8, "original length");
  const packed = u64(b, 16, "compressed length");
  if (org !== "DT")
    throw new MdfFault(
      "mdf4_unsupported",
      `${name} holds compressed ${org} data, not records (DT)`,
    );
  if (zip > 1)
    throw new MdfFault("mdf4_unsupported", `${name}: compression type ${zip} is unknown`);
  if (packed + 48 + 8 * links > length)
    throw new MdfFault(
      "mdf4_bad_length",
      `${name} claims ${packed} compressed bytes but holds fewer`,
    );
  if (orgLength > MAX_DZ_BYTES || packed > MAX_DZ_BYTES)
    throw new MdfFault(
      "mdf4_bad_length",
      `${name} claims ${Math.max(orgLength, packed)} bytes, more than a compressed block may hold (${MAX_DZ_BYTES})`,
    );
  if (zip === 1 && columns === 0)
    throw new MdfFault("mdf4_bad_value", `${name} is transposed with 0 columns`);
  return {
    kind: "dz",
    offset: at,
    start: start + 24,
    packed,
    length: orgLength,
    transposed: zip === 1,
    columns,
  };
}

/**
 * The data bytes of `pieces`, in order, in chunks of at most 1 MiB (a DZ block: whole). A DT
 * chunk lives in one buffer reused for the next: the consumer copies what it keeps. (A fresh
 * buffer per chunk would wait for a collection while counting in the resident size.)
 */
export async function* dataChunks(file: MdfFile, pieces: Piece[]): AsyncGenerator<Uint8Array> {
  let buf: Uint8Array | undefined;
  for (const p of pieces) {
    if (p.kind === "dt") {
      for (let done = 0; done < p.length; done += CHUNK) {
        const n = Math.min(CHUNK, p.length - done);
        buf ??= new Uint8Array(CHUNK);
        yield await file.readInto(buf, p.start + done, n, `DT block at offset ${p.offset}`);
      }
      continue;
    }
    if (p.length === 0) continue;
    const packed = await file.read(p.start, p.packed, `DZ block at offset ${p.offset}`);
    yield p.transposed ? untranspose(inflate(packed, p), p.columns) : inflate(packed, p);
  }
}

function inflate(packed: Uint8Array, p: Extract<Piece, { kind: "dz" }>): Uint8Array {
  const name = `DZ block at offset ${p.offset}`;
  let out: Buffer;
  try {
    out = inflateSync(packed, { maxOutputLength: p.length });
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === "ERR_BUFFER_TOO_LARGE")
      throw new MdfFault(
        "mdf4_dz_too_large",
        `${name} inflates to more than its declared ${p.length} bytes; refused (damaged or hostile file)`,
      );
    const why = e instanceof Error ? e.message : String(e);
    throw new MdfFault("mdf4_dz_corrupt", `${name} does not inflate (${why}); the file is damaged`);
  }
  if (out.length !== p.length)
    throw new MdfFault(
      "mdf4_dz_corrupt",
      `${name} inflates to ${out.length} bytes but declares ${p.length}; the file is damaged`,
    );
  return new Uint8Array(out.buffer, out.byteOffset, out.length);
}

/**
 * Undo the transposition: the first rows·columns bytes were stored column by column (byte j of
 * every record, then byte j+1, …), which packs better; the rest as is.
 */
function untranspose(b: Uint8Array, columns: number): Uint8Array {
  const rows = Math.floor(b.length / columns);
  if (rows <= 1) return b;
  const out = new Uint8Array(b.length);
  for (let c = 0; c < columns; c++) {
    const src = c * rows;
    for (let r = 0; r < rows; r++) out[r * columns + c] = b[src + r]!;
  }
  out.set(b.subarray(rows * columns), rows * columns);
  return out;
}
