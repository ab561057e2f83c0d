/**
 * `npm run bench` (third part): the chart JSON of the demo drive logs. Seeds the demo data into
 * a MariaDB of its own (port BENCH_DATABASE_PORT + 1, default 3469), lets the real server analyse
 * the 8 sample drive logs, signs in as the demo engineer and requests every drive log's
 * GET /vehicles/:v/logs/:l/charts.json 30 times. Prints the JSON size (goal: under 300 KB) and
 * the server's answer time, median and slowest (goal: the loader under 50 ms), plus the
 * comparison page of the two damper variants.
 */
import {
  benchSetup,
  cleanUp,
  prepareDatabaseAndBuild,
  startBenchServer,
  type BenchServer,
} from "./bench-server.ts";

const setup = benchSetup("charts", 1, { TRUST_PROXY: "loopback" });

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;

let server: BenchServer | undefined;
try {
  prepareDatabaseAndBuild(setup, { seed: true });
  server = await startBenchServer(setup);
  const { base } = server;
  const { HttpClient } = await import("../tests/support/http-client.ts");
  const { DEMO_PASSWORD } = await import("../app/demo/demo-seed.server.ts");
  const client = new HttpClient(base);
  const signedIn = await client.signIn("engineer@twistlog.test", DEMO_PASSWORD);
  if (signedIn.status !== 302) throw new Error(`sign-in answered ${signedIn.status}`);

  const { db, pool } = await import("../app/lib/infra/db.server.ts");
  const { driveLogs } = await import("../app/lib/infra/db/schema-drive-logs.ts");
  let logs: { id: number; vehicleId: number; fileName: string; status: string }[] = [];
  const t0 = performance.now();
  for (;;) {
    logs = await db
      .select({
        id: driveLogs.id,
        vehicleId: driveLogs.vehicleId,
        fileName: driveLogs.fileName,
        status: driveLogs.status,
      })
      .from(driveLogs);
    if (logs.every((l) => l.status === "done" || l.status === "failed")) break;
    if (performance.now() - t0 > 300_000) throw new Error("the demo analyses did not finish");
    await new Promise((r) => setTimeout(r, 500));
  }
  await pool.end();

  console.log(
    `\ncharts: GET …/charts.json of the ${logs.length} demo drive logs, 30 requests each`,
  );
  console.log(
    "  drive log                                               JSON KB   median ms   slowest ms",
  );
  for (const log of logs) {
    const path = `/vehicles/${log.vehicleId}/logs/${log.id}/charts.json`;
    const times: number[] = [];
    let bytes = 0;
    let first = 0;
    for (let i = 0; i < 31; i++) {
      const r0 = performance.now();
      const r = await client.get(path);
      const ms = performance.now() - r0;
      if (r.status !== 200) throw new Error(`${path} answered ${r.status}`);
      bytes = Buffer.byteLength(r.html);
      // The first request builds the body (then kept per analysis, analyses/chart-bodies.server.ts).
      if (i > 0) times.push(ms);
      else first = ms;
    }
    console.log(
      `  ${log.fileName.padEnd(55)} ${(bytes / 1024).toFixed(1).padStart(7)}   ${median(times).toFixed(1).padStart(9)}   ${Math.max(
        ...times,
      )
        .toFixed(1)
        .padStart(10)}`,
    );
  }
  const pair = logs.filter((l) => l.fileName.includes("kst-d4-runup"));
  if (pair.length === 2) {
    const path = `/vehicles/${pair[0]!.vehicleId}/compare?logs=${pair.map((l) => l.id).join(",")}`;
    const times: number[] = [];
    for (let i = 0; i < 11; i++) {
      const r0 = performance.now();
      const r = await client.get(path);
      if (r.status !== 200) throw new Error(`${path} answered ${r.status}`);
      if (i > 0) times.push(performance.now() - r0);
    }
    console.log(
      `  comparison page (server render), 2 run-ups: median ${median(times).toFixed(1)} ms, slowest ${Math.max(...times).toFixed(1)} ms`,
    );
  }
  console.log(
    "  (times are the whole HTTP request on loopback: session check, query, gunzip, JSON)",
  );
} finally {
  await cleanUp(setup, server);
}
