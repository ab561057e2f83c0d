/**
 * Channel conversions (CC blocks; ASAM MDF 4.2, ASAM e.V., conversion block — types and
 * parameter layouts from memory of the standard): raw value → physical value. Numeric types are
 * applied; text conversions (value → text and the rest) keep the raw value, since a speed is
 * never a text, and say so in a note. Links: name, unit, comment, inverse, then `ref_count`
 * references. Data: type u8, precision u8, flags u16, ref_count u16, val_count u16, physical
 * range min/max f64, then val_count f64 parameters.
 */
import { needData, readBlock, readText } from "./blocks.ts";
import { MdfFault, type MdfFile } from "./file.ts";

export interface Conversion {
  /** Raw → physical; undefined for 1:1 (the hot loop skips the call). */
  apply?: (x: number) => number;
  /** The conversion's unit (cc_md_unit), "" when none. */
  unit: string;
  /** Short name of the kind, for notes and tests ("1:1", "linear", …). */
  kind: string;
  /** Why the raw value is kept, for a conversion this reader does not apply. */
  note?: string;
}

const KINDS = [
  "1:1",
  "linear",
  "rational",
  "algebraic",
  "value to value (interpolated)",
  "value to value",
  "value range to value",
  "value to text",
  "value range to text",
  "text to value",
  "text to text",
  "bitfield to text",
];

/** The conversion at `offset` (0: none, 1:1). `integerRaw` picks the range rule of type 6. */
export async function readConversion(
  file: MdfFile,
  offset: number,
  from: string,
  integerRaw: boolean,
): Promise<Conversion> {
  if (offset === 0) return { unit: "", kind: "1:1" };
  const b = await readBlock(file, offset, ["##CC"], from);
  needData(b, 24, 4);
  const where = `CC block at offset ${offset}`;
  const type = b.data.getUint8(0);
  const valCount = b.data.getUint16(6, true);
  needData(b, 24 + 8 * valCount, 4);
  const p: number[] = [];
  for (let i = 0; i < valCount; i++) p.push(b.data.getFloat64(24 + 8 * i, true));
  const unit = await readText(file, b.links[1] ?? 0, where);
  const kind = KINDS[type] ?? `type ${type}`;
  const need = (n: number, rule: string) => {
    if (
      p.length < n ||
      (rule === "pairs" && p.length % 2 !== 0) ||
      (rule === "triples" && p.length % 3 !== 1)
    )
      throw new MdfFault(
        "mdf4_bad_conversion",
        `${where} (${kind}) has ${p.length} parameters, which does not fit its kind`,
      );
  };
  switch (type) {
    case 0:
      return { unit, kind };
    case 1: {
      need(2, "");
      const [b0, a] = p as [number, number];
      // y = a·x + b, parameters stored as [b, a].
      if (a === 1 && b0 === 0) return { unit, kind };
      return { apply: (x) => a * x + b0, unit, kind };
    }
    case 2: {
      need(6, "");
      const [p1, p2, p3, p4, p5, p6] = p as [number, number, number, number, number, number];
      return {
        apply: (x) => (p1 * x * x + p2 * x + p3) / (p4 * x * x + p5 * x + p6),
        unit,
        kind,
      };
    }
    case 4:
    case 5: {
      need(2, "pairs");
      const keys = p.filter((_, i) => i % 2 === 0);
      const vals = p.filter((_, i) => i % 2 === 1);
      return { apply: tableLookup(keys, vals, type === 4), unit, kind };
    }
    case 6: {
      need(1, "triples");
      return { apply: rangeLookup(p, integerRaw), unit, kind };
    }
    default:
      return {
        unit,
        kind,
        note: `its conversion (${kind}) is not numeric; the raw values are kept`,
      };
  }
}

/** Index of the last key ≤ x in ascending `keys` (−1 when x is below them all). */
function below(keys: number[], x: number): number {
  let lo = 0;
  let hi = keys.length - 1;
  if (!(x >= keys[0]!)) return -1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (keys[mid]! <= x) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}

/**
 * Value-to-value table: outside the keys the first or last value; between two keys either the
 * straight line between their values (interpolated) or the value of the nearer key (without;
 * the lower one at the exact middle — from memory of the standard).
 */
function tableLookup(keys: number[], vals: number[], interpolate: boolean) {
  const n = keys.length;
  return (x: number): number => {
    if (Number.isNaN(x)) return NaN;
    const i = below(keys, x);
    if (i < 0) return vals[0]!;
    if (i >= n - 1) return vals[n - 1]!;
    const k0 = keys[i]!;
    const k1 = keys[i + 1]!;
    if (interpolate) return vals[i]! + ((vals[i + 1]! - vals[i]!) * (x - k0)) / (k1 - k0);
    return x - k0 <= k1 - x ? vals[i]! : vals[i + 1]!;
  };
}

/**
 * Value-range-to-value table [min, max, value]… then a default: the first range holding x
 * gives its value. Integer raw values match min ≤ x ≤ max, floats min ≤ x < max (the standard's
 * rule, from memory).
 */
function rangeLookup(p: number[], integerRaw: boolean) {
  const n = (p.length - 1) / 3;
  const dflt = p[p.length - 1]!;
  return (x: number): number => {
    for (let i = 0; i < n; i++) {
      const lo = p[3 * i]!;
      const hi = p[3 * i + 1]!;
      if (x >= lo && (integerRaw ? x <= hi : x < hi)) return p[3 * i + 2]!;
    }
    return dflt;
  };
}
