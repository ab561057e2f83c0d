/**
 * `npm run bench` (fourth part; alone: `npm run bench:load`): many readers at once (issue 12).
 * Starts a MariaDB of its own (port BENCH_DATABASE_PORT + 2, default 3470) and the production
 * server, uploads the Kestrel KST-D4 run-up (damper A) and waits for its analysis, signs in
 * through the sign-in form, then lets autocannon keep 100 and then 200 connections busy for
 * LOAD_SECONDS (default 20) on the drive log's chart JSON (gzip accepted) and on its page,
 * while 10 technicians (LOAD_UPLOADS) upload few-MB drive logs by API token in a loop. Prints
 * requests/s, latency percentiles, non-2xx answers, errors and timeouts (autocannon's 10 s),
 * the server's peak memory, and whether it still runs and how soon it answers /healthz again.
 * Any error, timeout, non-2xx answer, refused upload, a server that died or did not answer
 * /healthz within 2 minutes is a FAIL, and the bench then exits non-zero.
 */
import { openAsBlob } from "node:fs";
import { availableParallelism, loadavg } from "node:os";
import { join } from "node:path";
import { gzipSync } from "node:zlib";
import autocannon, { type Result } from "autocannon";
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

const SECONDS = Number(process.env.LOAD_SECONDS ?? "20");
/** LOAD_UPLOADS=0 shows what the uploads and their analyses cost the readers. */
const UPLOADERS = Number(process.env.LOAD_UPLOADS ?? "10");
const CONNECTIONS = [100, 200];
/** How long the server may take to answer /healthz again once the load stops. */
const HEALTH_WAIT_MS = 120_000;
const DEMO_LOG = join(root, "samples/kestrel-kst-d4-runup-3rd-full-load-damper-a.csv");
if (!(SECONDS > 0)) throw new Error("LOAD_SECONDS must be a positive number of seconds");
if (!(UPLOADERS >= 0)) throw new Error("LOAD_UPLOADS must be 0 or more");

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

const setup = benchSetup("load", 2, { TRUST_PROXY: "loopback" });
let server: BenchServer | undefined;
let failed = false;
try {
  // Distinct logs (16–25 s at 5 kHz, about 3–5 MB), so no upload is a copy of another's.
  const files = Array.from({ length: UPLOADERS }, (_, i) => join(setup.dir, `load-${i}.csv`));
  files.forEach((file, i) =>
    setup.run(process.execPath, [
      "--import",
      "tsx",
      join(root, "bench/drive-log.ts"),
      file,
      String(16 + i),
      "5000",
    ]),
  );
  prepareDatabaseAndBuild(setup);

  const { TEST_PASSWORD } = await import("../tests/support/accounts.ts");
  const { vehicleData } = await import("../app/lib/data/vehicles.server.ts");
  const { vehicleSchema } = await import("../app/lib/domain/vehicle-schema.ts");
  const { pool } = await import("../app/lib/infra/db.server.ts");
  const { team, token } = await benchTeam("Load");
  // The uploads go to a vehicle of their own: their columns differ from the demo log's.
  const vehicles = vehicleData(team.id);
  const readVehicle = await vehicles.create(
    vehicleSchema.parse({ name: "Kestrel KST-D4", identifier: "KST-D4", cylinders: 4, stroke: 4 }),
  );
  const uploadVehicle = await vehicles.create(
    vehicleSchema.parse({ name: "Load car", identifier: "L-1", cylinders: 4, stroke: 4 }),
  );
  await pool.end();

  server = await startBenchServer(setup, process.env.BENCH_NODE_ARGS?.split(" ").filter(Boolean));
  const { base, pid } = server;
  const auth = { Authorization: `Bearer ${token}` };
  const upload = async (vehicleId: number, file: string, condition: string) => {
    const form = new FormData();
    form.set("condition", condition);
    form.set("file", await openAsBlob(file, { type: "text/csv" }), file.split("/").pop());
    return fetch(`${base}/api/v1/vehicles/${vehicleId}/logs`, {
      method: "POST",
      headers: auth,
      body: form,
    });
  };

  const first = await upload(readVehicle, DEMO_LOG, "run-up");
  if (first.status !== 202) throw new Error(`the demo upload answered ${first.status}`);
  const logId = ((await first.json()) as { log: { id: number } }).log.id;
  const t0 = performance.now();
  for (let status = "queued"; status !== "done"; await sleep(250)) {
    if (performance.now() - t0 > 300_000) throw new Error("the demo analysis did not finish");
    const r = await fetch(`${base}/api/v1/logs/${logId}`, { headers: auth });
    status = ((await r.json()) as { log: { status: string } }).log.status;
    if (status === "failed") throw new Error("the demo drive log's analysis failed");
  }

  const { HttpClient } = await import("../tests/support/http-client.ts");
  const client = new HttpClient(base);
  const signedIn = await client.signIn(team.accounts.engineer.email, TEST_PASSWORD);
  if (signedIn.status !== 302) throw new Error(`sign-in answered ${signedIn.status}`);
  const headers = {
    Cookie: client.cookieHeader(),
    "Accept-Encoding": "gzip",
  };
  const targets = [
    { label: "chart JSON", path: `/vehicles/${readVehicle}/logs/${logId}/charts.json` },
    { label: "drive-log page", path: `/vehicles/${readVehicle}/logs/${logId}` },
  ];
  for (const t of targets) {
    // Signed in and allowed: anything but 200 here would make every loaded request a non-2xx.
    const r = await fetch(base + t.path, { headers, redirect: "manual" });
    if (r.status !== 200) throw new Error(`${t.path} answered ${r.status}`);
    // fetch inflates: the size as read, and the whole body's gzip size to compare with.
    const body = Buffer.from(await r.arrayBuffer());
    console.log(
      `  ${t.label}: ${(body.length / 1024).toFixed(0)} kB (${(gzipSync(body).length / 1024).toFixed(0)} kB gzipped)`,
    );
  }

  // The background: each technician uploads again as soon as the last upload was answered.
  let uploading = true;
  const uploads = { accepted: 0, refused: new Map<number, number>(), errors: 0 };
  const uploaders = files.map(async (file) => {
    while (uploading) {
      try {
        const r = await upload(uploadVehicle, file, "run-up");
        await r.arrayBuffer();
        if (r.status === 202) uploads.accepted++;
        else uploads.refused.set(r.status, (uploads.refused.get(r.status) ?? 0) + 1);
      } catch {
        uploads.errors++;
        await sleep(200);
      }
    }
  });

  const loadBefore = loadavg()[0]!.toFixed(1);
  const rows: {
    label: string;
    connections: number;
    result: Result;
    peakMB: number;
    up: boolean;
  }[] = [];
  for (const t of targets) {
    for (const connections of CONNECTIONS) {
      let peakMB = memoryOf(pid).rssMB;
      const sampler = setInterval(() => {
        if (!server?.exited()) peakMB = Math.max(peakMB, memoryOf(pid).rssMB);
      }, 100);
      const result = await autocannon({
        url: base + t.path,
        connections,
        duration: SECONDS,
        headers,
        timeout: 10,
      });
      clearInterval(sampler);
      rows.push({ label: t.label, connections, result, peakMB, up: !server.exited() });
      process.stderr.write(`  (${t.label} × ${connections} done)\n`);
    }
  }
  uploading = false;
  await Promise.all(uploaders);

  // Requests whose client gave up may still be worked on: how long until /healthz answers again.
  const after = performance.now();
  let health = "no answer";
  while (!server.exited() && performance.now() - after < HEALTH_WAIT_MS) {
    try {
      const r = await fetch(`${base}/healthz`, { signal: AbortSignal.timeout(10_000) });
      health = `${r.status} ${await r.text()}`;
      if (r.ok) break;
    } catch (error) {
      health = `no answer (${(error as Error).message})`;
    }
    await sleep(500);
  }
  const healthS = (performance.now() - after) / 1000;
  const stayedUp = !server.exited();

  const num = (n: number, w: number, digits = 0) => n.toFixed(digits).padStart(w);
  console.log(
    `\nload: ${SECONDS} s per row on loopback, ${UPLOADERS} uploads (API, 3–5 MB CSV) running meanwhile`,
  );
  // Other programs on the machine take their share: the figures mean little without it.
  console.log(
    `  machine: ${availableParallelism()} cores, load average ${loadBefore} before the readers, ${loadavg()[0]!.toFixed(1)} after (1 min)`,
  );
  console.log(
    "  route            conns   req/s   p50 ms  p97.5 ms   p99 ms  non-2xx  errors  timeouts  peak RSS MB",
  );
  for (const { label, connections, result: r, peakMB, up } of rows) {
    const fault = r.errors > 0 || r.non2xx > 0 || !up;
    failed ||= fault;
    console.log(
      `  ${label.padEnd(16)} ${num(connections, 5)} ${num(r.requests.average, 7, 1)} ${num(
        r.latency.p50,
        8,
      )} ${num(r.latency.p97_5, 9)} ${num(r.latency.p99, 8)} ${num(r.non2xx, 8)} ${num(
        r.errors - r.timeouts,
        7,
      )} ${num(r.timeouts, 9)} ${num(peakMB, 12)}  ${fault ? "FAIL" : "ok"}${up ? "" : " (server died)"}`,
    );
    const codes = Object.entries(r.statusCodeStats).filter(([code]) => /^[13-5]\d\d$/.test(code));
    if (codes.length > 0)
      console.log(`    answers: ${codes.map(([c, s]) => `${s.count}× ${c}`).join(", ")}`);
  }
  const refused = [...uploads.refused].map(([s, n]) => `${n}× ${s}`).join(", ") || "none";
  const uploadFault = uploads.errors > 0 || uploads.refused.size > 0;
  failed ||= uploadFault || !stayedUp || !health.startsWith("200");
  console.log(
    `  uploads meanwhile: ${uploads.accepted} accepted (202), refused: ${refused}, connection errors: ${uploads.errors}  ${uploadFault ? "FAIL" : "ok"}`,
  );
  console.log(
    `  after the load: server ${stayedUp ? "still running" : `ended (${server.exited()})`}, GET /healthz → ${health} (${healthS.toFixed(1)} s after the load), peak RSS over the whole run ${stayedUp ? memoryOf(pid).peakMB.toFixed(0) : "?"} MB`,
  );
  console.log(
    "  (req/s: answered requests per second; latency of each request as autocannon measured it;",
  );
  console.log("   errors: connection errors besides timeouts; a timeout is no answer within 10 s)");
} finally {
  await cleanUp(setup, server);
}
if (failed) {
  console.log("load: FAIL (see the rows marked FAIL)");
  process.exitCode = 1;
}
