/**
 * The structure of an MDF4 file (ASAM MDF 4.2, ASAM e.V.; field layouts from memory of the
 * standard): identification block at 0, header block HD at 64, its chain of data groups (DG),
 * each with a chain of channel groups (CG), each with a chain of channels (CN). Only the
 * description is read here — names, units, conversions, where each value sits in a record —
 * never the samples (records.ts does that, only for the channels asked for).
 */
import type { SourceMetadataEntry } from "../types.ts";
import { chain, commentParts, needData, readBlock, readText, u64 } from "./blocks.ts";
import { readConversion, type Conversion } from "./conversions.ts";
import { MdfFault, type MdfFile } from "./file.ts";

export interface Channel {
  name: string;
  unit: string;
  comment: string;
  /** File offset of the CN block, for messages. */
  offset: number;
  /** 0 fixed, 1 variable length (SD), 2 master, 3 virtual master, 4 sync, 5 max length, 6 virtual. */
  type: number;
  /** 0 none, 1 time, 2 angle, 3 distance, 4 index. */
  syncType: number;
  /** 0/1 unsigned LE/BE, 2/3 signed LE/BE, 4/5 IEEE float LE/BE; higher: text, bytes, … */
  dataType: number;
  bitOffset: number;
  byteOffset: number;
  bitCount: number;
  flags: number;
  invalBitPos: number;
  conversion: Conversion;
}

export interface ChannelGroup {
  /** Acquisition name, or "group N" (N counts channel groups through the file from 1). */
  name: string;
  offset: number;
  recordId: number;
  cycles: number;
  /** Variable-length signal data group (cg_flags bit 0): its records are length-prefixed. */
  vlsd: boolean;
  dataBytes: number;
  invalBytes: number;
  /** The numeric channels (master included), in chain order. */
  channels: Channel[];
  master?: Channel;
}

export interface DataGroup {
  offset: number;
  /** Bytes of the record id before each record: 0 (sorted) or 1, 2, 4, 8 (unsorted). */
  recIdSize: number;
  /** Link to the data: DT, DZ, DL, HL or 0. */
  data: number;
  groups: ChannelGroup[];
}

export interface MdfModel {
  /** Version as written, e.g. "4.10". */
  version: string;
  unfinished: boolean;
  metadata: SourceMetadataEntry[];
  dataGroups: DataGroup[];
  /** Things skipped or kept raw, one sentence each. */
  notes: string[];
}

/** Largest record the reader accepts (a CAN logger's widest record is a few kB). */
const MAX_RECORD = 1 << 24;

/** Reads the identification block, the header and every group's description. */
export async function readStructure(file: MdfFile): Promise<MdfModel> {
  const id = await file.read(0, 64, "the identification block");
  const fileId = String.fromCharCode(...id.subarray(0, 8));
  if (fileId !== "MDF     " && fileId !== "UnFinMF ")
    throw new MdfFault("mdf4_not_mdf", "the file does not start with an MDF identification block");
  const version = String.fromCharCode(...id.subarray(8, 16)).trim();
  const ver = new DataView(id.buffer, id.byteOffset).getUint16(28, true);
  if (ver < 400 || ver >= 500)
    throw new MdfFault(
      "mdf4_version",
      `the file is MDF version ${version || ver}; only MDF 4.0 to 4.2 can be read (save it as MDF 4)`,
    );
  const notes: string[] = [];
  const unfinished = fileId === "UnFinMF ";
  file.unfinished = unfinished;
  if (unfinished)
    notes.push("the file was not finalised by its logger; sample counts are taken from the data");
  const hd = await readBlock(file, 64, ["##HD"], "the identification block");
  needData(hd, 8, 6);
  const metadata: SourceMetadataEntry[] = [];
  const startNs = hd.data.getBigUint64(0, true);
  if (startNs > 0n && startNs < 10n ** 19n)
    metadata.push({ key: "start time", value: new Date(Number(startNs / 1000000n)).toISOString() });
  const hdComment = commentParts(await readText(file, hd.links[5] ?? 0, "HD block at offset 64"));
  if (hdComment.comment) metadata.push({ key: "comment", value: hdComment.comment });
  for (const [key, value] of hdComment.properties) metadata.push({ key, value });

  const dataGroups: DataGroup[] = [];
  let cgNumber = 0;
  for await (const dg of chain(file, hd.links[0] ?? 0, ["##DG"], "HD block at offset 64")) {
    needData(dg, 1, 3);
    const recIdSize = dg.data.getUint8(0);
    if (![0, 1, 2, 4, 8].includes(recIdSize))
      throw new MdfFault(
        "mdf4_bad_value",
        `DG block at offset ${dg.offset}: record id size ${recIdSize} is not 0, 1, 2, 4 or 8`,
      );
    const groups: ChannelGroup[] = [];
    const from = `DG block at offset ${dg.offset}`;
    for await (const cg of chain(file, dg.links[1] ?? 0, ["##CG"], from)) {
      cgNumber++;
      groups.push(await readGroup(file, cg, cgNumber, notes));
    }
    if (recIdSize === 0 && groups.length > 1)
      throw new MdfFault(
        "mdf4_bad_value",
        `DG block at offset ${dg.offset} holds ${groups.length} channel groups without record ids`,
      );
    dataGroups.push({ offset: dg.offset, recIdSize, data: dg.links[2] ?? 0, groups });
  }
  return { version, unfinished, metadata, dataGroups, notes };
}

async function readGroup(
  file: MdfFile,
  cg: Awaited<ReturnType<typeof readBlock>>,
  number: number,
  notes: string[],
): Promise<ChannelGroup> {
  needData(cg, 32, 6);
  const where = `CG block at offset ${cg.offset}`;
  const flags = cg.data.getUint16(16, true);
  const vlsd = (flags & 1) !== 0;
  const dataBytes = cg.data.getUint32(24, true);
  const invalBytes = cg.data.getUint32(28, true);
  const acq = await readText(file, cg.links[2] ?? 0, where);
  const group: ChannelGroup = {
    name: acq || `group ${number}`,
    offset: cg.offset,
    recordId: u64(cg, 0, "record id"),
    cycles: u64(cg, 8, "cycle count"),
    vlsd,
    dataBytes,
    invalBytes,
    channels: [],
  };
  if (vlsd) return group; // the signal data of a variable-length channel: skipped
  if (dataBytes + invalBytes > MAX_RECORD)
    throw new MdfFault(
      "mdf4_bad_length",
      `${where}: records of ${dataBytes + invalBytes} bytes are absurd`,
    );
  for await (const cn of chain(file, cg.links[1] ?? 0, ["##CN"], where)) {
    needData(cn, 24, 8);
    const at = `CN block at offset ${cn.offset}`;
    const d = cn.data;
    const dataType = d.getUint8(2);
    const ch: Channel = {
      name: await readText(file, cn.links[2] ?? 0, at),
      unit: "",
      comment: "",
      offset: cn.offset,
      type: d.getUint8(0),
      syncType: d.getUint8(1),
      dataType,
      bitOffset: d.getUint8(3),
      byteOffset: d.getUint32(4, true),
      bitCount: d.getUint32(8, true),
      flags: d.getUint32(12, true),
      invalBitPos: d.getUint32(16, true),
      conversion: await readConversion(file, cn.links[4] ?? 0, at, dataType < 4),
    };
    const label = `channel "${ch.name}" (${at})`;
    if (ch.type === 1 || ch.type === 5) {
      notes.push(`${label} holds variable-length signal data (SD), which is skipped`);
      continue;
    }
    if (dataType > 5) {
      if (ch.type !== 2) notes.push(`${label} is not numeric and is skipped`);
      continue;
    }
    if (cn.links[1])
      notes.push(`${label} has a composition (structure or array), which is ignored`);
    checkLayout(ch, dataBytes, label);
    ch.unit = (await readText(file, cn.links[6] ?? 0, at)) || ch.conversion.unit;
    ch.comment = commentParts(await readText(file, cn.links[7] ?? 0, at)).comment;
    if (ch.conversion.note) notes.push(`${label}: ${ch.conversion.note}`);
    if ((ch.type === 2 || ch.type === 3) && !group.master) group.master = ch;
    group.channels.push(ch);
  }
  return group;
}

/** A value must sit inside the record, in a width its type can have. */
function checkLayout(ch: Channel, dataBytes: number, label: string): void {
  if (ch.type === 3 || ch.type === 6) return; // virtual: the value is the record index
  const float = ch.dataType >= 4;
  const widthOk = float
    ? [16, 32, 64].includes(ch.bitCount) && ch.bitOffset === 0
    : ch.bitCount >= 1 && ch.bitCount <= 64;
  if (!widthOk)
    throw new MdfFault(
      "mdf4_bad_channel",
      `${label}: ${float ? "a float" : "an integer"} of ${ch.bitCount} bits at bit offset ${ch.bitOffset} cannot be read`,
    );
  const bytes = Math.ceil((ch.bitOffset + ch.bitCount) / 8);
  if (ch.byteOffset + bytes > dataBytes)
    throw new MdfFault(
      "mdf4_bad_channel",
      `${label} lies outside its record (bytes ${ch.byteOffset}–${ch.byteOffset + bytes} of ${dataBytes})`,
    );
}
