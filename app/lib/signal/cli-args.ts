/**
 * Command-line arguments of `npm run analyse -- FILE …`, read with node:util parseArgs.
 * A bad flag or value becomes a one-line message, never a throw.
 */
import { parseArgs } from "node:util";
import type { AnalysisOptions } from "./analysis-options.ts";
import type { IngestOptions } from "./ingest.ts";
import type { SpeedUnit, TimeUnit } from "./types.ts";
import { SPEED_UNITS, TIME_UNITS, parseSpeedUnit, parseTimeUnit } from "./units.ts";

export interface CliCommand {
  file: string;
  ingest: IngestOptions;
  analysis: AnalysisOptions;
  json: boolean;
  help: boolean;
  /** --list-channels: print the file's channel table instead of analysing it. */
  listChannels?: boolean;
  /** --low-memory: 0, every log through the windowed analysis (pipeline.ts). */
  inMemoryLimitBytes?: number;
}

export const USAGE = `usage: npm run -s analyse -- FILE [--cylinders N] [--stroke 4|2] [--order Q]
       [--time COL] [--crank COL] [--gearbox COL] [--unit rpm|rad/s|deg/s|rev/s]
       [--crank-unit U] [--gearbox-unit U] [--time-unit s|ms] [--rattle-limit RAD_PER_S2]
       [--bin-rpm N] [--strict] [--repair-limit-ms MS] [--repair-limit-samples N]
       [--header-row N] [--low-memory] [--json]
       npm run -s analyse -- FILE --list-channels [--time COL] [--crank COL] [--gearbox COL]

Reads a drive log — CSV text or ASAM MDF4, told by its content — (time, crank-side and
gearbox-side angular velocity), tracks the orders against the crank, and prints the isolation at the firing order, the damper
resonance and the idle rattle check. --json prints the full result document instead.
Short dropouts and gaps (up to --repair-limit-ms, default 10, and --repair-limit-samples,
default 20, whichever is fewer) are filled, jitter is resampled, longer gaps split the log
into sections; every repair is listed as a warning. --strict refuses such a log instead.
A CSV's header row is found behind any recorder preamble; --header-row N (the file line)
picks it instead.
Logs over 128 MiB are analysed in windows, in memory that does not grow with the log;
--low-memory does that for any log (slower, the same figures).
--list-channels prints every channel of the file (CSV or ASAM MDF4): name, unit, group, rate,
samples, range and the role it is recognised as, then exits.
The compiled command takes the same flags: npx twistlog analyse FILE [flags].`;

const OPTIONS = {
  cylinders: { type: "string" },
  stroke: { type: "string" },
  order: { type: "string" },
  time: { type: "string" },
  crank: { type: "string" },
  gearbox: { type: "string" },
  unit: { type: "string" },
  "crank-unit": { type: "string" },
  "gearbox-unit": { type: "string" },
  "time-unit": { type: "string" },
  "rattle-limit": { type: "string" },
  "bin-rpm": { type: "string" },
  strict: { type: "boolean" },
  "repair-limit-ms": { type: "string" },
  "repair-limit-samples": { type: "string" },
  "header-row": { type: "string" },
  json: { type: "boolean" },
  "low-memory": { type: "boolean" },
  "list-channels": { type: "boolean" },
  help: { type: "boolean", short: "h" },
} as const;

type Parsed = { ok: true; value: CliCommand } | { ok: false; message: string };

/** A positive number from a flag, or a message naming the flag. */
function positive(
  flag: string,
  text: string | undefined,
  integer = false,
): number | string | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (text.trim() === "" || !Number.isFinite(v) || v <= 0 || (integer && !Number.isInteger(v))) {
    return `--${flag} needs a positive ${integer ? "whole number" : "number"}, got "${text}"`;
  }
  return v;
}

function speedUnit(flag: string, text: string | undefined): SpeedUnit | string | undefined {
  if (text === undefined) return undefined;
  return (
    parseSpeedUnit(text) ?? `--${flag}: unknown unit "${text}" (use ${SPEED_UNITS.join(", ")})`
  );
}

/** Parse argv (without node and script). Units: --rattle-limit in rad/s², --bin-rpm in rpm. */
export function parseCliArgs(argv: string[]): Parsed {
  let parsed;
  try {
    parsed = parseArgs({ args: argv, options: OPTIONS, allowPositionals: true, strict: true });
  } catch (e) {
    // parseArgs messages are one sentence plus a hint after a newline; keep the first line.
    const message = e instanceof Error ? (e.message.split("\n")[0] ?? e.message) : String(e);
    return { ok: false, message };
  }
  const v = parsed.values;
  if (v.help)
    return { ok: true, value: { file: "", ingest: {}, analysis: {}, json: false, help: true } };
  if (parsed.positionals.length !== 1) {
    return {
      ok: false,
      message:
        parsed.positionals.length === 0
          ? "no drive log given (FILE)"
          : `one file at a time, got ${parsed.positionals.length}`,
    };
  }
  const cylinders = positive("cylinders", v.cylinders, true);
  const order = positive("order", v.order);
  const rattle = positive("rattle-limit", v["rattle-limit"]);
  const binRpm = positive("bin-rpm", v["bin-rpm"]);
  const repairMs = positive("repair-limit-ms", v["repair-limit-ms"]);
  const repairSamples = positive("repair-limit-samples", v["repair-limit-samples"], true);
  const headerRow = positive("header-row", v["header-row"], true);
  const unit = speedUnit("unit", v.unit);
  const crankUnit = speedUnit("crank-unit", v["crank-unit"]);
  const gearboxUnit = speedUnit("gearbox-unit", v["gearbox-unit"]);
  let timeUnit: TimeUnit | string | undefined;
  if (v["time-unit"] !== undefined) {
    timeUnit =
      parseTimeUnit(v["time-unit"]) ??
      `--time-unit: unknown unit "${v["time-unit"]}" (use ${TIME_UNITS.join(", ")})`;
  }
  let stroke: 2 | 4 | string | undefined;
  if (v.stroke !== undefined)
    stroke =
      v.stroke === "4" ? 4 : v.stroke === "2" ? 2 : `--stroke must be 4 or 2, got "${v.stroke}"`;
  if (typeof cylinders === "number" && cylinders > 24)
    return { ok: false, message: `--cylinders must be 24 or fewer, got ${cylinders}` };
  for (const x of [
    cylinders,
    order,
    rattle,
    binRpm,
    repairMs,
    repairSamples,
    headerRow,
    unit,
    crankUnit,
    gearboxUnit,
    timeUnit,
    stroke,
  ]) {
    if (typeof x === "string" && x.startsWith("--")) return { ok: false, message: x };
  }
  const pick = <T>(x: T | string | undefined, ok: (y: T | string) => boolean) =>
    x !== undefined && ok(x) ? (x as T) : undefined;
  const isUnit = (y: unknown) => typeof y === "string" && !y.startsWith("--");
  const ingest: IngestOptions = {
    ...(v.time !== undefined ? { timeColumn: v.time } : {}),
    ...(v.crank !== undefined ? { crankColumn: v.crank } : {}),
    ...(v.gearbox !== undefined ? { gearboxColumn: v.gearbox } : {}),
  };
  const u = pick<SpeedUnit>(unit, isUnit);
  const cu = pick<SpeedUnit>(crankUnit, isUnit);
  const gu = pick<SpeedUnit>(gearboxUnit, isUnit);
  const tu = pick<TimeUnit>(timeUnit, isUnit);
  if (u) ingest.unit = u;
  if (cu) ingest.crankUnit = cu;
  if (gu) ingest.gearboxUnit = gu;
  if (tu) ingest.timeUnit = tu;
  if (v.strict === true) ingest.strict = true;
  if (typeof repairMs === "number") ingest.repairMaxS = repairMs / 1000;
  if (typeof repairSamples === "number") ingest.repairMaxSamples = repairSamples;
  if (typeof headerRow === "number") ingest.headerRow = headerRow;
  const analysis: AnalysisOptions = {};
  if (typeof cylinders === "number") analysis.cylinders = cylinders;
  if (stroke === 2 || stroke === 4) analysis.stroke = stroke;
  if (typeof order === "number") analysis.firingOrder = order;
  if (typeof rattle === "number") analysis.rattleLimitRadS2 = rattle;
  if (typeof binRpm === "number") analysis.binRpm = binRpm;
  return {
    ok: true,
    value: {
      file: parsed.positionals[0] ?? "",
      ingest,
      analysis,
      json: v.json === true,
      help: false,
      ...(v["list-channels"] === true ? { listChannels: true } : {}),
      ...(v["low-memory"] === true ? { inMemoryLimitBytes: 0 } : {}),
    },
  };
}
