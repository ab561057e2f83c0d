/**
 * `npm run bench` (second part): streams a ~100 MB drive log through the real server
 * (POST /api/v1/vehicles/:id/logs with an API token) and prints the server's resident memory
 * before, during the upload and during the analysis that follows, with the wall times. The
 * goal (issue 5): the server's memory stays well below the file size while the upload streams.
 * It starts a MariaDB of its own in a temporary folder (port BENCH_DATABASE_PORT, default 3468)
 * and builds the app first when build/ is missing.
 */
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

const setup = benchSetup("upload", 0);
const { dir, run } = setup;

let server: BenchServer | undefined;
try {
  const file = join(dir, "upload-bench.csv");
  run(process.execPath, ["--import", "tsx", join(root, "bench/drive-log.ts"), file, "670", "5000"]);
  const bytes = statSync(file).size;
  prepareDatabaseAndBuild(setup);

  // Settings are in process.env now, so the app modules connect to the bench database.
  const { vehicleData } = await import("../app/lib/data/vehicles.server.ts");
  const { vehicleSchema } = await import("../app/lib/domain/vehicle-schema.ts");
  const { pool } = await import("../app/lib/infra/db.server.ts");
  const { team, token } = await benchTeam("Bench");
  const vehicleId = await vehicleData(team.id).create(
    vehicleSchema.parse({ name: "Bench car", identifier: "B-1", cylinders: 4, stroke: 4 }),
  );
  await pool.end();

  server = await startBenchServer(setup);
  const { pid, base } = server;
  const idle = memoryOf(pid);

  let peakDuring = idle.rssMB;
  const sampler = setInterval(() => (peakDuring = Math.max(peakDuring, memoryOf(pid).rssMB)), 20);
  const form = new FormData();
  form.set("condition", "run-up");
  form.set("file", await openAsBlob(file, { type: "text/csv" }), "upload-bench.csv");
  const t0 = performance.now();
  const response = await fetch(`${base}/api/v1/vehicles/${vehicleId}/logs`, {
    method: "POST",
    headers: { Authorization: `Bearer ${token}` },
    body: form,
  });
  const uploadS = (performance.now() - t0) / 1000;
  const uploadPeak = peakDuring;
  const { log } = (await response.json()) as { log: { id: number } };
  if (response.status !== 202) throw new Error(`upload answered ${response.status}`);

  let status = "queued";
  let maxRequestMs = 0;
  while (status !== "done" && status !== "failed") {
    const r0 = performance.now();
    const r = await fetch(`${base}/api/v1/logs/${log.id}`, {
      headers: { Authorization: `Bearer ${token}` },
    });
    maxRequestMs = Math.max(maxRequestMs, performance.now() - r0); // the page stays responsive
    status = ((await r.json()) as { log: { status: string } }).log.status;
    await new Promise((r) => setTimeout(r, 100));
  }
  const doneS = (performance.now() - t0) / 1000;
  clearInterval(sampler);
  const fileMB = bytes / 1e6;

  console.log(`\nupload: ${fileMB.toFixed(1)} MB drive log through POST /api/v1/vehicles/:id/logs`);
  console.log(
    `  upload (stream to storage, gzip, hash)  ${uploadS.toFixed(2)} s   ${(fileMB / uploadS).toFixed(0)} MB/s`,
  );
  console.log(
    `  upload → analysis ${status}              ${doneS.toFixed(2)} s after the upload began`,
  );
  console.log(`  server RSS idle                          ${idle.rssMB.toFixed(0)} MB`);
  console.log(
    `  server RSS peak during the upload        ${uploadPeak.toFixed(0)} MB (+${(uploadPeak - idle.rssMB).toFixed(0)} MB for a ${fileMB.toFixed(0)} MB file)`,
  );
  console.log(
    `  server RSS peak with the analysis        ${peakDuring.toFixed(0)} MB (worker thread in the same process)`,
  );
  console.log(`  slowest status request during analysis   ${maxRequestMs.toFixed(0)} ms`);
} finally {
  await cleanUp(setup, server);
}
