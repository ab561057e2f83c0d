/**
 * The channel table `--list-channels` prints: one line per channel with name, unit, group,
 * rate, sample count, range and recognised role, in aligned columns (plain text, for a terminal
 * or a pipe; "-" where the file does not tell).
 */
import type { ChannelInfo } from "./types.ts";

const HEAD = ["name", "unit", "group", "rate Hz", "samples", "min", "max", "role"];

/** A number short enough for a table: up to 6 significant digits, no exponent below 1e9. */
function num(x: number | null): string {
  if (x === null || !Number.isFinite(x)) return "-";
  return Math.abs(x) >= 1e9 ? x.toExponential(4) : String(Number(x.toPrecision(6)));
}

export function channelTable(channels: readonly ChannelInfo[]): string {
  const rows = channels.map((c) => [
    c.name,
    c.unit ?? "-",
    c.group ?? "-",
    num(c.sampleRateHz),
    String(c.samples),
    num(c.min),
    num(c.max),
    c.role ?? "-",
  ]);
  const widths = HEAD.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  // Text left, numbers right (columns 3–6), so figures line up by their last digit.
  const line = (cells: string[]) =>
    cells
      .map((c, i) => (i >= 3 && i <= 6 ? c.padStart(widths[i]!) : c.padEnd(widths[i]!)))
      .join("  ")
      .trimEnd();
  return [line(HEAD), ...rows.map(line)].join("\n");
}
