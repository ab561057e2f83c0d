/**
 * MDF4 blocks as stored (ASAM MDF 4.2, ASAM e.V.; the layouts below are written from memory of
 * the standard and checked against the reference files in tests/fixtures/mdf4): every block
 * starts with a 24-byte header — id "##XX" (4 chars), 4 reserved bytes, its length (uint64,
 * header included) and its link count (uint64) — then that many 8-byte links (file offsets,
 * 0 = none), then its data. All numbers little endian.
 *
 * Everything read here is checked before it is used: the id is the one the link promised, the
 * length fits the file and a sane bound, every link points inside the file. A problem is an
 * MdfFault naming the block id and its offset, so a damaged file gives one clear sentence.
 */
import { MdfFault, type MdfFile } from "./file.ts";

export interface Block {
  id: string;
  offset: number;
  length: number;
  links: number[];
  /** The data section (after the links), whole for blocks read whole, else empty. */
  data: DataView;
}

/** Longest block the reader takes in one piece (names, conversions, lists, comments). */
export const MAX_META_BYTES = 1 << 24;
const HEADER = 24;

/** A link value as a safe number, checked to lie inside the file (0 stays 0: "no block"). */
function link(v: bigint, file: MdfFile, at: string): number {
  if (v === 0n) return 0;
  if (v < 64n || v > BigInt(file.size - HEADER))
    throw new MdfFault(
      "mdf4_bad_link",
      `${at} links to offset ${v}, outside the file (${file.size} bytes); the file is truncated or damaged`,
    );
  return Number(v);
}

/** The 24-byte header at `offset`, checked: id one of `ids`, length within the file. */
export async function readHeader(
  file: MdfFile,
  offset: number,
  ids: readonly string[],
  from: string,
  toFileEnd = false,
): Promise<{ id: string; length: number; linkCount: number }> {
  const h = await file.read(offset, HEADER, `the block at offset ${offset} (linked from ${from})`);
  const dv = new DataView(h.buffer, h.byteOffset, h.byteLength);
  const id = String.fromCharCode(...h.subarray(0, 4));
  if (!ids.includes(id))
    throw new MdfFault(
      "mdf4_wrong_block",
      `expected a ${ids.map((i) => i.slice(2)).join(" or ")} block at offset ${offset} (linked from ${from}) but found "${printable(id)}"; the file is damaged`,
    );
  const length = dv.getBigUint64(8, true);
  const linkCount = dv.getBigUint64(16, true);
  const name = `${id.slice(2)} block at offset ${offset}`;
  if (length < BigInt(HEADER) + linkCount * 8n)
    throw new MdfFault(
      "mdf4_bad_length",
      `${name} claims ${linkCount} links but is only ${length} bytes long`,
    );
  if (toFileEnd && BigInt(offset) + length > BigInt(file.size))
    return { id, length: file.size - offset, linkCount: Number(linkCount) };
  if (BigInt(offset) + length > BigInt(file.size))
    throw new MdfFault(
      "mdf4_truncated",
      `${name} is ${length} bytes long but the file ends ${file.size - offset} bytes after its start; the file is truncated or damaged`,
    );
  return { id, length: Number(length), linkCount: Number(linkCount) };
}

/** A whole block (header, links, data), refused when longer than MAX_META_BYTES. */
export async function readBlock(
  file: MdfFile,
  offset: number,
  ids: readonly string[],
  from: string,
): Promise<Block> {
  const { id, length, linkCount } = await readHeader(file, offset, ids, from);
  const name = `${id.slice(2)} block at offset ${offset}`;
  if (length > MAX_META_BYTES)
    throw new MdfFault(
      "mdf4_bad_length",
      `${name} is ${length} bytes long, more than a block of its kind can sensibly be (${MAX_META_BYTES})`,
    );
  const bytes = await file.read(offset, length, name);
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const links: number[] = [];
  for (let i = 0; i < linkCount; i++)
    links.push(link(dv.getBigUint64(HEADER + 8 * i, true), file, name));
  const start = HEADER + 8 * linkCount;
  const data = new DataView(bytes.buffer, bytes.byteOffset + start, length - start);
  return { id, offset, length, links, data };
}

/** Fails with `mdf4_bad_length` unless the block's data holds at least `bytes` bytes. */
export function needData(b: Block, bytes: number, links = 0): void {
  if (b.data.byteLength < bytes || b.links.length < links)
    throw new MdfFault(
      "mdf4_bad_length",
      `${b.id.slice(2)} block at offset ${b.offset} is too short for its kind (${b.links.length} links, ${b.data.byteLength} data bytes)`,
    );
}

/** A uint64 field as a number, refused when beyond 2^53 (no file has that many of anything). */
export function u64(b: Block, at: number, field: string): number {
  const v = b.data.getBigUint64(at, true);
  if (v > BigInt(Number.MAX_SAFE_INTEGER))
    throw new MdfFault(
      "mdf4_bad_value",
      `${b.id.slice(2)} block at offset ${b.offset}: ${field} ${v} is absurd`,
    );
  return Number(v);
}

/** Walks a chain of blocks through link 0 ("next"), refusing cycles and absurd lengths. */
export async function* chain(
  file: MdfFile,
  first: number,
  ids: readonly string[],
  from: string,
  max = 1_000_000,
): AsyncGenerator<Block> {
  const seen = new Set<number>();
  let at = first;
  let prev = from;
  while (at !== 0) {
    if (seen.has(at))
      throw new MdfFault(
        "mdf4_link_cycle",
        `the ${ids[0]?.slice(2)} chain from ${from} loops back to offset ${at}; the file is damaged`,
      );
    if (seen.size >= max)
      throw new MdfFault(
        "mdf4_too_many",
        `the ${ids[0]?.slice(2)} chain from ${from} has more than ${max} blocks`,
      );
    seen.add(at);
    const b = await readBlock(file, at, ids, prev);
    yield b;
    prev = `${b.id.slice(2)} block at offset ${at}`;
    at = b.links[0] ?? 0;
  }
}

/** Text of a TX block, or of an MD block as XML (UTF-8, up to the first zero byte). */
export async function readText(file: MdfFile, offset: number, from: string): Promise<string> {
  if (offset === 0) return "";
  const b = await readBlock(file, offset, ["##TX", "##MD"], from);
  const bytes = new Uint8Array(b.data.buffer, b.data.byteOffset, b.data.byteLength);
  const end = bytes.indexOf(0);
  return new TextDecoder("utf-8").decode(end >= 0 ? bytes.subarray(0, end) : bytes).trim();
}

function printable(id: string): string {
  return id.replace(/[^\x20-\x7e]/g, "?");
}

const ENTITIES: Record<string, string> = { lt: "<", gt: ">", amp: "&", quot: '"', apos: "'" };
function unescape(s: string): string {
  return s.replace(/&(lt|gt|amp|quot|apos|#\d+|#x[0-9a-f]+);/gi, (_, e: string) => {
    if (e[0] === "#")
      return String.fromCodePoint(
        e[1] === "x" || e[1] === "X" ? parseInt(e.slice(2), 16) : Number(e.slice(1)),
      );
    return ENTITIES[e.toLowerCase()] ?? "";
  });
}

/**
 * The comment of an MD block's XML (its <TX> element) and the name/value pairs of its
 * <common_properties> (<e name="…">value</e>); a plain TX block's text is the comment.
 */
export function commentParts(text: string): { comment: string; properties: [string, string][] } {
  if (!text.startsWith("<")) return { comment: text, properties: [] };
  const tx = /<TX(?:\s[^>]*)?>([\s\S]*?)<\/TX>/.exec(text);
  const properties: [string, string][] = [];
  const common = /<common_properties>([\s\S]*?)<\/common_properties>/.exec(text)?.[1] ?? "";
  for (const m of common.matchAll(/<e\s+[^>]*?name\s*=\s*"([^"]*)"[^>]*>([\s\S]*?)<\/e>/g))
    properties.push([unescape(m[1] ?? "").trim(), unescape(m[2] ?? "").trim()]);
  return { comment: unescape(tx?.[1] ?? "").trim(), properties };
}
