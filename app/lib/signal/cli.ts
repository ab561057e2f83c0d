/**
 * `npm run -s analyse -- FILE [flags]`: ingest a drive log, analyse it, print the result.
 * --json prints the result document (validated against analysisResultSchema) on stdout; without
 * it a short summary with units on every figure. Bad input: one line on stderr, exit 1; a bad
 * flag exits 2. Never a stack trace. Progress goes to stderr only when stderr is a terminal.
 */
import { pathToFileURL } from "node:url";
import { z } from "zod";
import { channelTable } from "./channel-table.ts";
import { parseCliArgs, USAGE } from "./cli-args.ts";
import { listChannelsOfFile } from "./ingest-stream.ts";
import { startBlockHelper, stopBlockHelper } from "./block-helper.ts";
import { ingestFileParallel } from "./ingest-parallel.ts";
import {
  analyseSource,
  type FileAnalysis,
  type PipelineInput,
  type PipelineStage,
} from "./pipeline.ts";
import type { SignalIssue } from "./types.ts";

/** Running from the bundle (build/cli, scripts/build-cli.mjs), not from the TypeScript source. */
const COMPILED = !import.meta.url.endsWith(".ts");

/**
 * The pipeline as the command runs it. Compiled, a log analysed in memory gets the helper thread
 * (block-helper.ts): a CSV is read in two parts on two threads (ingest-parallel.ts), and the
 * helper shares the low-pass, the angle, the blocks and the transients. Under tsx each thread would first
 * load the TypeScript loader, which costs more than it saves. Same output either way
 * (cli-bin.test.ts). The helper starts only on the in-memory way: the windowed way never uses
 * it, and a second idle thread would add its memory to the bounded peak (goal 1 of issue 17).
 */
export function analyseFile(
  input: PipelineInput & { source: string },
  onProgress?: (stage: PipelineStage, fraction: number) => void,
) {
  return analyseSource(
    COMPILED ? { ...input, ingestWholeFile: ingestWithHelper } : input,
    onProgress,
  );
}

/** ingestFileParallel with the helper thread started first (its arrays shared from then on). */
function ingestWithHelper(...args: Parameters<typeof ingestFileParallel>) {
  startBlockHelper();
  return ingestFileParallel(...args);
}

// The bundle's pipeline and threads, for bench/cli.bench.ts's stage profile of compiled code.
export { startBlockHelper, stopBlockHelper };

/** One line naming the problem, its row and column. */
export function describeIssue(file: string, e: SignalIssue): string {
  const where = [
    e.row !== undefined && !e.message.includes(`row ${e.row}`) ? `row ${e.row}` : "",
    e.column !== undefined && !e.message.includes(`"${e.column}"`) ? `column "${e.column}"` : "",
  ]
    .filter(Boolean)
    .join(", ");
  return `${file}: ${e.message.replace(/\s*\n\s*/g, " ")}${where ? ` (${where})` : ""} [${e.code}]`;
}

const f1 = (x: number) => x.toFixed(1);
const f0 = (x: number) => x.toFixed(0);

/** The human summary: every figure with its unit. */
export function summarise(file: string, { result: r, log }: FileAnalysis): string {
  const s = log.source;
  const lines = [
    `Twistlog analysis of ${file}`,
    `  log: ${f1(r.durationS)} s at ${f0(r.sampleRateHz)} Hz, ${s.rows} rows; crank "${s.crankColumn}" (${s.crankUnit}), gearbox "${s.gearboxColumn}" (${s.gearboxUnit}), time "${s.timeColumn}" (${s.timeUnit})`,
    `  firing order: ${r.firingOrder} (${r.settings.cylinders} cylinders, ${r.settings.stroke}-stroke)`,
  ];
  const speeds: [string, number][] = [
    ["idle", r.idle?.meanRpm ?? 800],
    ["", 1500],
    ["", 2000],
    ["", 3000],
  ];
  const iso = speeds.flatMap(([label, rpm]) => {
    let best: (typeof r.isolation)[number] | undefined;
    for (const p of r.isolation)
      if (
        Math.abs(p.rpm - rpm) <= r.settings.binRpm &&
        (!best || Math.abs(p.rpm - rpm) < Math.abs(best.rpm - rpm))
      )
        best = p;
    if (!best) return [];
    const name = label ? `${label} ${f0(best.rpm)} rpm` : `${f0(best.rpm)} rpm`;
    return [
      `    ${name.padEnd(16)} ${f1(best.dB).padStart(6)} dB${best.aboveNoise ? "" : " (gearbox near noise: a lower bound)"}`,
    ];
  });
  lines.push(`  isolation at order ${r.firingOrder} (crank / gearbox, positive = attenuation):`);
  lines.push(
    ...(iso.length > 0 ? iso : ["    none of idle, 1500, 2000, 3000 rpm is covered by this log"]),
  );
  lines.push(
    r.resonance
      ? `  damper resonance: ${f0(r.resonance.rpm)} rpm, isolation ${f1(r.resonance.isolationDb)} dB`
      : "  damper resonance: not in the speed range of this log",
  );
  if (r.model)
    lines.push(
      `  two-mass model fit: natural frequency ${f1(r.model.naturalFrequencyHz)} Hz (${f0(r.model.resonanceRpm)} rpm at order ${r.firingOrder}), damping ratio ${r.model.dampingRatio.toFixed(3)}`,
    );
  for (const e of r.events ?? []) {
    const res =
      e.resonanceRpm === null
        ? "resonance not resolved"
        : `resonance ${f0(e.resonanceRpm)} rpm, peak amplification ${f1(e.peakAmplificationDb ?? 0)} dB, ${(e.timeNearResonanceS ?? 0).toFixed(2)} s within ±10 % of it`;
    lines.push(
      `  engine ${e.kind} ${e.startS.toFixed(1)}–${e.endS.toFixed(1)} s: ${res}; gearbox angular acceleration peak ${f0(e.peakGearboxAngAccelRadS2)} rad/s², twist ${f1(e.twistPeakToPeakDeg)}° peak to peak`,
    );
  }
  if (r.transient?.lowestResolvedRpm)
    lines.push(
      `  firing order resolved down to ${f0(r.transient.lowestResolvedRpm)} rpm${r.transient.unresolvedReason ? ` (${r.transient.unresolvedReason})` : ""}`,
    );
  if (r.idle) {
    const i = r.idle;
    lines.push(
      `  rattle check at idle (${f0(i.meanRpm)} rpm): gearbox angular acceleration ${f0(i.gearboxAngAccelRadS2)} rad/s² at order ${r.firingOrder}, peak ${f0(i.gearboxAngAccelPeakRadS2)} rad/s², limit ${f0(i.limitRadS2)} rad/s²: ${i.verdict === "ok" ? "within the limit" : "OVER THE LIMIT"}`,
    );
  } else lines.push("  rattle check: no idle segment in this log");
  for (const w of r.warnings) lines.push(`  warning: ${w.message} [${w.code}]`);
  if (r.idle || r.resonance || (r.events ?? []).length > 0) {
    lines.push(
      "  caution: verdicts come from a recording; road tests belong on a closed course with trained staff, and damper or clutch work is licensed workshop work.",
    );
  }
  return lines.join("\n");
}

/** Stage progress on a terminal: one rewritten line on stderr. */
function terminalProgress(): ((stage: PipelineStage, fraction: number) => void) | undefined {
  if (!process.stderr.isTTY) return undefined;
  let last = "";
  return (stage, fraction) => {
    const text = `${stage} ${Math.round(fraction * 100)} %`;
    if (text === last) return;
    last = text;
    process.stderr.write(`\r\x1b[K${text}`);
  };
}

/** Run the CLI on argv; returns the exit code. Writes only through the given streams. */
export async function main(
  argv: string[],
  out = process.stdout,
  err = process.stderr,
): Promise<number> {
  const args = parseCliArgs(argv);
  if (!args.ok) {
    err.write(`analyse: ${args.message} (see --help)\n`);
    return 2;
  }
  if (args.value.help) {
    out.write(`${USAGE}\n`);
    return 0;
  }
  const cmd = args.value;
  if (cmd.listChannels) {
    const listed = await listChannelsOfFile(cmd.file, cmd.ingest);
    if (!listed.ok) {
      err.write(`${describeIssue(cmd.file, listed.error)}\n`);
      return 1;
    }
    out.write(`${channelTable(listed.value)}\n`);
    return 0;
  }
  const progress = err === process.stderr ? terminalProgress() : undefined;
  // Compiled, the in-memory way starts the helper thread (analyseFile); stopped here either way.
  const outcome = await analyseFile({ ...cmd, source: cmd.file }, progress).finally(
    stopBlockHelper,
  );
  if (progress) err.write("\r\x1b[K");
  if (!outcome.ok) {
    err.write(`${describeIssue(cmd.file, outcome.error)}\n`);
    return 1;
  }
  out.write(
    cmd.json
      ? `${JSON.stringify(outcome.value.result)}\n`
      : `${summarise(cmd.file, outcome.value)}\n`,
  );
  return 0;
}

/**
 * Runs the CLI as a process does: main() on argv, its code as the exit code, a thrown bug as
 * one line (exit 70). The entry of both `npm run analyse` (below) and the compiled
 * `twistlog` command (bin/twistlog.mjs).
 */
export function runCommand(argv: string[]): void {
  // One process, one result check: zod's compiled object parsers cost more to generate than they
  // save on a single document (about 20–35 ms cold on the bench log; docs/performance.md).
  z.config({ jitless: true });
  main(argv).then(
    (code) => {
      process.exitCode = code;
    },
    (e: unknown) => {
      // A bug, not bad input: still one line, no stack trace.
      process.stderr.write(
        `analyse: internal error: ${e instanceof Error ? e.message : String(e)}\n`,
      );
      process.exitCode = 70;
    },
  );
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href)
  runCommand(process.argv.slice(2));
