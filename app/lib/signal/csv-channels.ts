/**
 * The channel list of a CSV drive log, for the channel picker and `--list-channels`: every
 * column with its unit, sample count, range and recognised role, in one streaming pass. Memory
 * is the head, one line and a few numbers per column, never the file's values.
 */
import { namesWithUnits, resolveColumns, unitOfName, recogniseColumn } from "./columns.ts";
import { createHeadCollector, type HeadResult } from "./csv-head.ts";
import type { CsvHead } from "./ingest-header.ts";
import type { IngestOptions } from "./ingest.ts";
import { splitFields } from "./ingest-preamble.ts";
import {
  bytesToText,
  concat,
  MAX_LINE_BYTES,
  OK,
  parseNumberText,
  scanLine,
  type RowScratch,
} from "./ingest-scan.ts";
import { teamChannel } from "./team-channels.ts";
import type { ChannelInfo, ChannelRole, Outcome, SignalIssue } from "./types.ts";
import { S_PER_UNIT } from "./units.ts";

interface Stats {
  samples: number;
  min: number;
  max: number;
  first: number;
  last: number;
}

/**
 * The role of each column: the resolved map when the options and the header decide all three;
 * else each column's own role (team name first, then the built-in words) where that role has
 * one column only, so a file the ingest would refuse can still be picked from.
 */
function rolesOf(head: CsvHead, options: IngestOptions) {
  const { headers, units } = head;
  const roles: (ChannelRole | null)[] = headers.map(() => null);
  const resolved = resolveColumns(headers, options, units);
  if (resolved.ok) {
    const { map } = resolved;
    roles[map.time] = "time";
    roles[map.crank] = "crank";
    roles[map.gearbox] = "gearbox";
    return { roles, timeScale: S_PER_UNIT[map.timeUnit] };
  }
  const named = namesWithUnits(headers, units);
  const own = headers.map((h, i) => {
    const team = teamChannel(h, options.channelNames);
    if (team) return team.role;
    const role = recogniseColumn(named[i] ?? h).role;
    return role === "other" ? null : role;
  });
  own.forEach((role, i) => {
    if (role && own.filter((r) => r === role).length === 1) roles[i] = role;
  });
  const t = roles.indexOf("time");
  const timeUnit = t >= 0 ? (unitOfName(named[t] ?? "").timeUnit ?? "s") : "s";
  return { roles, timeScale: S_PER_UNIT[timeUnit] };
}

const fail = (error: SignalIssue): Outcome<ChannelInfo[]> => ({ ok: false, error, warnings: [] });

/** Every column of a CSV drive log streamed as `chunks`. Options as for the ingest. */
export async function listCsvChannels(
  chunks: AsyncIterable<string | Uint8Array>,
  options: IngestOptions = {},
): Promise<Outcome<ChannelInfo[]>> {
  const collector = createHeadCollector(options);
  let head: CsvHead | undefined;
  let stats: Stats[] = [];
  let row: RowScratch = { vals: new Float64Array(1), stat: new Uint8Array(1), texts: [] };
  let carry: Uint8Array = new Uint8Array(0);
  let line = 0;
  let bad: SignalIssue | undefined;

  const readLine = (b: Uint8Array, s: number, e: number) => {
    line++;
    if (e > s && b[e - 1] === 13) e--;
    if (e === s || !head) return;
    const { delimiter, decimal } = head;
    let f = scanLine(b, s, e, delimiter.charCodeAt(0), decimal.charCodeAt(0), decimal, row);
    if (f === -2)
      bad ??= {
        code: "not_text",
        message: `the file is not text: control bytes in row ${line}`,
        row: line,
      };
    if (f === -1) {
      // A quoted line: split carefully, as the ingest does (papaparse), then read each cell.
      const fields = splitFields(bytesToText(b, s, e), delimiter, true);
      f = Math.min(fields.length, row.vals.length);
      for (let c = 0; c < f; c++) {
        const r = parseNumberText(fields[c] ?? "", decimal);
        row.vals[c] = r.value;
        row.stat[c] = r.status;
      }
    }
    for (let c = 0; c < Math.min(f, stats.length); c++) {
      const v = row.vals[c] ?? NaN;
      if (row.stat[c] !== OK || !Number.isFinite(v)) continue;
      const st = stats[c] as Stats;
      if (st.samples === 0) st.first = v;
      st.last = v;
      st.samples++;
      if (v < st.min) st.min = v;
      if (v > st.max) st.max = v;
    }
  };
  const feed = (b: Uint8Array, atEnd: boolean) => {
    let s = 0;
    if (carry.length > 0) {
      const nl = b.indexOf(10);
      if (nl < 0 && !atEnd) {
        carry = concat(carry, b);
        if (carry.length > MAX_LINE_BYTES)
          bad ??= {
            code: "not_text",
            message: `line ${line + 1} is longer than 1 MB; this does not look like a drive log`,
            row: line + 1,
          };
        return;
      }
      const joined = concat(carry, b.subarray(0, nl < 0 ? b.length : nl));
      carry = new Uint8Array(0);
      readLine(joined, 0, joined.length);
      s = nl < 0 ? b.length : nl + 1;
    }
    for (let nl = b.indexOf(10, s); nl >= 0 && !bad; nl = b.indexOf(10, s)) {
      readLine(b, s, nl);
      s = nl + 1;
    }
    if (atEnd && s < b.length) readLine(b, s, b.length);
    else if (s < b.length) carry = b.slice(s);
  };
  const start = (read: HeadResult, atEnd: boolean): void => {
    if (!read.ok) {
      bad = read.error;
      return;
    }
    head = read.value;
    const width = head.headers.length;
    stats = head.headers.map(() => ({
      samples: 0,
      min: Infinity,
      max: -Infinity,
      first: NaN,
      last: NaN,
    }));
    row = { vals: new Float64Array(width + 1), stat: new Uint8Array(width + 1), texts: [] };
    line = head.lastHeadLine;
    feed(collector.take().subarray(head.dataStart), atEnd);
  };

  try {
    for await (const chunk of chunks) {
      const b = typeof chunk === "string" ? new TextEncoder().encode(chunk) : chunk;
      if (head) feed(b, false);
      else {
        const read = collector.push(b);
        if (read) start(read, false);
      }
      if (bad) break; // leaving the loop ends the stream
    }
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    return fail({ code: "read_failed", message: `the file could not be read: ${message}` });
  }
  if (!head && !bad) start(collector.finish(), true);
  else if (head && !bad) feed(new Uint8Array(0), true);
  if (bad) return fail(bad);
  if (!head) return fail({ code: "empty_file", message: "the file is empty" });
  return { ok: true, value: describe(head, stats, options), warnings: [] };
}

function describe(head: CsvHead, stats: Stats[], options: IngestOptions): ChannelInfo[] {
  const { roles, timeScale } = rolesOf(head, options);
  const t = stats[roles.indexOf("time")];
  const span = t ? (t.last - t.first) * timeScale : NaN;
  const sampleRateHz = t && t.samples > 1 && span > 0 ? (t.samples - 1) / span : null;
  return head.headers.map((name, i) => {
    const st = stats[i] as Stats;
    const unit = head.units[i] || unitOfName(name).text || null;
    return {
      name,
      unit,
      group: null,
      sampleRateHz,
      samples: st.samples,
      min: st.samples > 0 ? st.min : null,
      max: st.samples > 0 ? st.max : null,
      role: roles[i] ?? null,
    };
  });
}
