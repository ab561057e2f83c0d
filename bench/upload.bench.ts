/**
 * `npm run bench` (upload part): the server's upload-to-result against the CLI (issue 17, goal 3)
 * and the server's memory while a large upload streams (issue 5).
 *
 * A 10-minute, 5 kHz drive log (3 M rows, about 92 MB, bench/drive-log.ts) goes through the real
 * server (POST /api/v1/vehicles/:id/logs with an API token) three times; each time is measured
 * from the first byte of the upload until the API says the analysis is `done`. In the same run
 * `npm run -s analyse -- FILE --json` analyses the same file as a child process three times
 * (before each upload, so both see the same load).
 * Printed: the medians, their ratio (goal ≤ 1.5), and where the server's extra time goes — the
 * upload itself (stream to storage, gzip, hash), then per job (ANALYSIS_TIMINGS=1, runner.server.ts):
 * waiting in the queue, column choice, worker start, the worker's run (of which reading and
 * decompressing the stored file, timed here on its own), carrying the result back, and the save.
 * It starts a MariaDB of its own in a temporary folder (BENCH_DATABASE_PORT, default 3468) and
 * builds the app first when build/ is missing.
 */
import { spawn } from "node:child_process";
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
import type { JobTimings } from "../app/lib/analyses/runner.server.ts";
import { ratioLine } from "./goal-lines.ts";

const RUNS = 3;
const GOAL_RATIO = 1.5;
const setup = benchSetup("upload", 0, { ANALYSIS_TIMINGS: "1" });
const { dir, run } = setup;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;

let server: BenchServer | undefined;
try {
  const file = join(dir, "upload-bench.csv");
  run(process.execPath, ["--import", "tsx", join(root, "bench/drive-log.ts"), file, "600", "5000"]);
  const bytes = statSync(file).size;
  const fileMB = bytes / 1e6;
  prepareDatabaseAndBuild(setup);

  // The CLI on the same file, as a user runs it (whole process); run between the uploads below,
  // so that both see the same load on a shared machine.
  const cliMs: number[] = [];
  // Asynchronously: a blocked event loop would miss the server closing an idle keep-alive
  // connection, and the next upload would be written into the closed socket (EPIPE).
  const runCli = async () => {
    const t0 = performance.now();
    const cli = spawn("npm", ["run", "-s", "analyse", "--", file, "--json"], {
      cwd: root,
      stdio: ["ignore", "ignore", "inherit"],
    });
    const code = await new Promise<number | null>((resolve) => cli.on("exit", resolve));
    if (code !== 0) throw new Error(`npm run analyse exited with ${code}`);
    cliMs.push(performance.now() - t0);
  };

  // Settings are in process.env now, so the app modules connect to the bench database.
  const { vehicleData } = await import("../app/lib/data/vehicles.server.ts");
  const { vehicleSchema } = await import("../app/lib/domain/vehicle-schema.ts");
  const { pool } = await import("../app/lib/infra/db.server.ts");
  const { team, token } = await benchTeam("Bench");
  const vehicleId = await vehicleData(team.id).create(
    vehicleSchema.parse({ name: "Bench car", identifier: "B-1", cylinders: 4, stroke: 4 }),
  );

  server = await startBenchServer(setup);
  const { pid, base } = server;
  const timings: JobTimings[] = [];
  server.process.stdout!.on("data", (d: Buffer) => {
    for (const m of d.toString().matchAll(/analysis timings: (\{.*\})/g))
      timings.push(JSON.parse(m[1]!) as JobTimings);
  });
  const idle = memoryOf(pid);
  let peak = idle.rssMB;
  const sampler = setInterval(() => (peak = Math.max(peak, memoryOf(pid).rssMB)), 20);
  const auth = { Authorization: `Bearer ${token}` };

  const uploads: { uploadMs: number; resultMs: number; uploadPeakMB: number; maxPollMs: number }[] =
    [];
  let blobKey = "";
  for (let i = 0; i < RUNS; i++) {
    await runCli();
    const before = memoryOf(pid).rssMB;
    peak = before;
    const form = new FormData();
    form.set("condition", "run-up");
    form.set("file", await openAsBlob(file, { type: "text/csv" }), `upload-bench-${i}.csv`);
    const t0 = performance.now();
    const response = await fetch(`${base}/api/v1/vehicles/${vehicleId}/logs`, {
      method: "POST",
      headers: auth,
      body: form,
    });
    const uploadMs = performance.now() - t0;
    const uploadPeakMB = peak - before;
    if (response.status !== 202) throw new Error(`upload answered ${response.status}`);
    const { log } = (await response.json()) as { log: { id: number } };
    let status = "queued";
    let maxPollMs = 0;
    while (status !== "done" && status !== "failed") {
      await new Promise((r) => setTimeout(r, 25));
      const r0 = performance.now();
      const r = await fetch(`${base}/api/v1/logs/${log.id}`, { headers: auth });
      maxPollMs = Math.max(maxPollMs, performance.now() - r0); // the server stays responsive
      status = ((await r.json()) as { log: { status: string } }).log.status;
    }
    if (status !== "done") throw new Error(`the analysis of upload ${i + 1} ${status}`);
    uploads.push({ uploadMs, resultMs: performance.now() - t0, uploadPeakMB, maxPollMs });
    blobKey = (await vehicleData(team.id).log(log.id)).blobKey;
  }
  clearInterval(sampler);

  // Reading and decompressing the stored file alone (the worker's first step), median of 3.
  const { blobStore } = await import("../app/lib/infra/storage-settings.server.ts");
  const readMs: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const t0 = performance.now();
    for await (const _ of blobStore().read(blobKey));
    readMs.push(performance.now() - t0);
  }
  await pool.end();

  const cli = median(cliMs);
  const result = median(uploads.map((u) => u.resultMs));
  const m = (k: keyof JobTimings) => median(timings.map((t) => t[k]));
  console.log(`\nupload-to-result: ${fileMB.toFixed(1)} MB drive log (median of ${RUNS} each)`);
  console.log(
    `  CLI, npm run -s analyse -- FILE --json    ${s(cli)}   (${cliMs.map(s).join(", ")})`,
  );
  console.log(
    `  server, first upload byte → done          ${s(result)}   (${uploads.map((u) => s(u.resultMs)).join(", ")})`,
  );
  console.log(
    `  ratio server / CLI                        ${(result / cli).toFixed(2)}   (goal ≤ ${GOAL_RATIO})`,
  );
  ratioLine(
    "3",
    "upload-to-result vs CLI, same file",
    result / 1000,
    "s",
    cli / 1000,
    `≤ ${GOAL_RATIO}`,
  );
  console.log(`  where the server's time goes (medians):`);
  const upload = median(uploads.map((u) => u.uploadMs));
  console.log(
    `    upload (stream to storage, gzip, hash)  ${s(upload)}   ${(fileMB / (upload / 1000)).toFixed(0)} MB/s`,
  );
  console.log(`    queued → claimed                        ${s(m("queuedMs"))}`);
  console.log(`    column choice (file head)               ${s(m("columnsMs"))}`);
  console.log(`    worker start / wait                     ${s(m("workerStartMs"))}`);
  console.log(`    worker run (read, parse, analyse)       ${s(m("analysisMs"))}`);
  console.log(`      of which storage read + gunzip alone  ${s(median(readMs))}`);
  console.log(`    result back from the worker             ${s(m("returnMs"))}`);
  console.log(`    save (encode, rows, status)             ${s(m("saveMs"))}`);
  const parts = (t: JobTimings) =>
    t.queuedMs + t.columnsMs + t.workerStartMs + t.analysisMs + t.returnMs + t.saveMs;
  const rest = uploads.map(
    (u, i) => u.resultMs - u.uploadMs - (timings[i] ? parts(timings[i]) : 0),
  );
  console.log(`    the rest (status poll every 25 ms)      ${s(median(rest))}`);
  console.log(`  server RSS idle                           ${idle.rssMB.toFixed(0)} MB`);
  console.log(
    `  server RSS growth during an upload        +${uploads[0]!.uploadPeakMB.toFixed(0)} MB for a ${fileMB.toFixed(0)} MB file (the first; later ones +${uploads
      .slice(1)
      .map((u) => u.uploadPeakMB.toFixed(0))
      .join(", +")} MB)`,
  );
  console.log(
    `  server RSS peak with the analysis         ${peak.toFixed(0)} MB (worker thread in the same process)`,
  );
  console.log(
    `  slowest status request during analysis    ${Math.max(...uploads.map((u) => u.maxPollMs)).toFixed(0)} ms`,
  );
} finally {
  await cleanUp(setup, server);
}
