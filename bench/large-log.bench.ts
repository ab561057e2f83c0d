/**
 * `npm run bench` (goal 1 of the performance issue): memory independent of log length. Writes
 * a drive log just under the 1 GiB upload limit (CSV, 5 kHz, ~33 M rows) and the same samples
 * as MDF4 into a temporary folder, plus a ~100 MB CSV for comparison, and analyses each
 *   - through the compiled CLI as a whole process (peak RSS from /usr/bin/time, wall time), and
 *   - through an upload to the real server (POST /api/v1/vehicles/:id/logs), printing the
 *     server process's resident memory above its idle level while the upload and the analysis
 *     run (the analysis worker is a thread of the same process).
 * Goal: peak RSS of the analysis ≤ 150 MB for the 1 GiB log, within 10 % of the 100 MB log's.
 * BENCH_LARGE_SECONDS overrides the large log's length (default 6500 s), for a quicker look.
 */
import { spawnSync } from "node:child_process";
import { openAsBlob, statSync } from "node:fs";
import { join } from "node:path";
import {
  benchSetup,
  benchTeam,
  cleanUp,
  memoryOf,
  prepareDatabaseAndBuild,
  root,
  startBenchServer,
  type BenchServer,
} from "./bench-server.ts";
import { ratioLine } from "./goal-lines.ts";

const GOAL_MB = 150;
const LARGE_S = Number(process.env.BENCH_LARGE_SECONDS ?? 6500);
const SMALL_S = 670; // ≈ 100 MB of CSV

const setup = benchSetup("large-log", 4);
const { dir, run } = setup;

/** Whole-process wall time (s) and peak RSS (MB) of the compiled CLI on `file`. */
function cliRun(file: string, ...flags: string[]): { wallS: number; peakMB: number; ok: boolean } {
  const t0 = performance.now();
  // /usr/bin/time writes the peak to stderr, after the command's own.
  const r = spawnSync(
    "/usr/bin/time",
    [
      "-f",
      "MAXRSS_KB=%M",
      // The command as npx runs it: by its #! line, which sets the node flags it wants.
      join(root, "bin/twistlog.mjs"),
      "analyse",
      file,
      ...flags,
    ],
    { cwd: root, encoding: "utf8", stdio: ["ignore", "ignore", "pipe"], maxBuffer: 1 << 26 },
  );
  const wallS = (performance.now() - t0) / 1000;
  const out = r.stderr ?? String(r.error);
  const ok = r.status === 0;
  const kB = Number(/MAXRSS_KB=(\d+)/.exec(out)?.[1] ?? NaN);
  if (!ok) console.log(`  the CLI failed on ${file}: ${out.trim().split("\n")[0]}`);
  return { wallS, peakMB: kB / 1024, ok };
}

/** Upload `file` and wait for its analysis; the server's RSS above idle at the peak. */
async function uploadRun(
  server: BenchServer,
  token: string,
  vehicleId: number,
  file: string,
  type: string,
) {
  const { pid, base } = server;
  const idle = memoryOf(pid).rssMB;
  let peak = idle;
  const sampler = setInterval(() => (peak = Math.max(peak, memoryOf(pid).rssMB)), 50);
  const form = new FormData();
  form.set("condition", "run-up");
  form.set("file", await openAsBlob(file, { type }), file.split("/").pop()!);
  const t0 = performance.now();
  const response = await fetch(`${base}/api/v1/vehicles/${vehicleId}/logs`, {
    method: "POST",
    headers: { Authorization: `Bearer ${token}` },
    body: form,
  });
  const body = (await response.json()) as { log?: { id: number }; error?: { message: string } };
  if (response.status !== 202 || !body.log)
    throw new Error(`upload answered ${response.status}: ${body.error?.message ?? "?"}`);
  let status = "queued";
  while (status !== "done" && status !== "failed") {
    await new Promise((r) => setTimeout(r, 250));
    const r = await fetch(`${base}/api/v1/logs/${body.log.id}`, {
      headers: { Authorization: `Bearer ${token}` },
    });
    status = ((await r.json()) as { log: { status: string } }).log.status;
  }
  clearInterval(sampler);
  return { wallS: (performance.now() - t0) / 1000, idleMB: idle, aboveIdleMB: peak - idle, status };
}

let server: BenchServer | undefined;
try {
  const small = join(dir, "small.csv");
  const large = join(dir, "large.csv");
  const largeMdf = join(dir, "large.mf4");
  const gen = (script: string, out: string, s: number) =>
    run(process.execPath, ["--import", "tsx", join(root, script), out, String(s), "5000"]);
  console.log(`\nlarge log: writing ${LARGE_S} s at 5 kHz as CSV and MDF4 into ${dir} …`);
  gen("bench/drive-log.ts", small, SMALL_S);
  gen("bench/drive-log.ts", large, LARGE_S);
  gen("bench/mdf4-log.ts", largeMdf, LARGE_S);
  const mb = (f: string) => statSync(f).size / 1e6;

  console.log("  through the CLI (whole process, /usr/bin/time):");
  // The 100 MB log goes in memory by default (pipeline.ts: up to 128 MiB); --low-memory sends
  // it through the windows like the 1 GiB ones, for the like-for-like ratio.
  const cli = {
    smallMemory: cliRun(small),
    small: cliRun(small, "--low-memory"),
    large: cliRun(large),
    mdf: cliRun(largeMdf),
  };
  for (const [name, f, r] of [
    ["CSV in memory", small, cli.smallMemory],
    ["CSV", small, cli.small],
    ["CSV", large, cli.large],
    ["MDF4", largeMdf, cli.mdf],
  ] as const)
    console.log(
      `    ${name.padEnd(13)} ${mb(f).toFixed(0).padStart(5)} MB  ${r.wallS.toFixed(1).padStart(6)} s  peak RSS ${r.peakMB.toFixed(0)} MB`,
    );
  ratioLine("1", "CLI peak RSS, 1 GiB CSV vs goal", cli.large.peakMB, "MB", GOAL_MB, "≤ 1");
  ratioLine("1", "CLI peak RSS, 1 GiB MDF4 vs goal", cli.mdf.peakMB, "MB", GOAL_MB, "≤ 1");
  ratioLine(
    "1",
    "CLI peak RSS, 1 GiB vs 100 MB CSV, both in windows",
    cli.large.peakMB,
    "MB",
    cli.small.peakMB,
    "≤ 1.1",
  );

  prepareDatabaseAndBuild(setup);
  const { vehicleData } = await import("../app/lib/data/vehicles.server.ts");
  const { vehicleSchema } = await import("../app/lib/domain/vehicle-schema.ts");
  const { pool } = await import("../app/lib/infra/db.server.ts");
  const { team, token } = await benchTeam("Large");
  const vehicleId = await vehicleData(team.id).create(
    vehicleSchema.parse({
      name: "Kestrel long-run car",
      identifier: "KST-L1",
      cylinders: 4,
      stroke: 4,
    }),
  );
  await pool.end();
  console.log(
    "  through an upload (a fresh server for each file: its RSS above its idle level, after start-up):",
  );
  // A process seldom gives memory back: a fresh server per file, so each peak is its own.
  const fresh = async (file: string, type: string) => {
    server = await startBenchServer(setup);
    await new Promise((r) => setTimeout(r, 2000)); // the warm workers settle
    const r = await uploadRun(server, token, vehicleId, file, type);
    const ended = new Promise((done) => server!.process.once("exit", done));
    server.process.kill("SIGTERM");
    await ended;
    server = undefined;
    return r;
  };
  const up = {
    small: await fresh(small, "text/csv"),
    large: await fresh(large, "text/csv"),
    mdf: await fresh(largeMdf, "application/octet-stream"),
  };
  for (const [name, f, r] of [
    ["CSV", small, up.small],
    ["CSV", large, up.large],
    ["MDF4", largeMdf, up.mdf],
  ] as const)
    console.log(
      `    ${name.padEnd(4)} ${mb(f).toFixed(0).padStart(5)} MB  ${r.wallS.toFixed(1).padStart(6)} s  ${r.status}  idle ${r.idleMB.toFixed(0)} MB, peak +${r.aboveIdleMB.toFixed(0)} MB`,
    );
  ratioLine(
    "1",
    "server RSS above idle, 1 GiB CSV vs goal",
    up.large.aboveIdleMB,
    "MB",
    GOAL_MB,
    "≤ 1",
  );
  ratioLine(
    "1",
    "server RSS above idle, 1 GiB MDF4 vs goal",
    up.mdf.aboveIdleMB,
    "MB",
    GOAL_MB,
    "≤ 1",
  );
} finally {
  await cleanUp(setup, server);
}
