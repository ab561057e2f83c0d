/**
 * `npm run bench` (charts part; alone: `npx tsx bench/charts.bench.ts`): the chart JSON against a
 * static file of the same size, the conditional request, the session lookup and the drive-log
 * page (issue 17, goals 4 and 5; the note is docs/serving-speed.md).
 *
 * Seeds the demo data into a MariaDB of its own (port BENCH_DATABASE_PORT + 1, default 3469),
 * lets the real production server analyse the sample drive logs and signs in as the demo
 * engineer. The largest chart body is the one measured; a copy of it (same bytes, so the same
 * size and the same compressibility) is written into build/client, where express.static serves
 * it. Then, side by side in one run, with autocannon (CHARTS_CONNECTIONS, default 50, for
 * CHARTS_SECONDS each, default 10; CHARTS_ROUNDS rounds, default 3, median shown), signed in:
 *   - charts.json and the static copy, Accept-Encoding gzip, then br: req/s, p50, p97.5, ratio
 *     (goal ≥ 0.8);
 *   - charts.json with If-None-Match (304): req/s;
 *   - the session and team lookup on its own (in this process, against the same database):
 *     ms per call and CPU ms per call, beside the server's CPU ms per chart request;
 *   - the drive-log page at PAGE_CONNECTIONS (default 100): req/s, p50, p97.5 (goal ≥ 150 req/s,
 *     p97.5 < 1 s).
 */
import { readFileSync, rmSync, writeFileSync } from "node:fs";
import { request } from "node:http";
import { availableParallelism, loadavg } from "node:os";
import { join } from "node:path";
import autocannon, { type Result } from "autocannon";
import {
  benchSetup,
  cleanUp,
  prepareDatabaseAndBuild,
  root,
  startBenchServer,
  type BenchServer,
} from "./bench-server.ts";
import { ratioLine } from "./goal-lines.ts";

const SECONDS = Number(process.env.CHARTS_SECONDS ?? "10");
const ROUNDS = Number(process.env.CHARTS_ROUNDS ?? "3");
const CONNECTIONS = Number(process.env.CHARTS_CONNECTIONS ?? "50");
const PAGE_CONNECTIONS = Number(process.env.PAGE_CONNECTIONS ?? "100");
const STATIC_NAME = "bench-chart-copy.json";
/** CHARTS_PARTS=page (or json,304,lookup): only those parts, e.g. to profile one with BENCH_NODE_ARGS. */
const PARTS = new Set((process.env.CHARTS_PARTS ?? "json,304,lookup,page").split(","));

const setup = benchSetup("charts", 1, { TRUST_PROXY: "loopback" });
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const num = (n: number, w: number, digits = 0) => n.toFixed(digits).padStart(w);

/** CPU seconds (user + system) a process has used so far (Linux /proc, clock ticks of 10 ms). */
function cpuSeconds(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1]!.split(" ");
  return (Number(fields[11]) + Number(fields[12])) / 100;
}

interface Row {
  result: Result;
  /** Server CPU ms per answered request. */
  cpuMs: number;
}

let server: BenchServer | undefined;
const staticFile = join(root, "build/client", STATIC_NAME);
try {
  prepareDatabaseAndBuild(setup, { seed: true });
  server = await startBenchServer(setup, process.env.BENCH_NODE_ARGS?.split(" ").filter(Boolean));
  const { base, pid } = server;
  const { HttpClient } = await import("../tests/support/http-client.ts");
  const { DEMO_PASSWORD } = await import("../app/demo/demo-seed.server.ts");
  const client = new HttpClient(base);
  const signedIn = await client.signIn("engineer@twistlog.test", DEMO_PASSWORD);
  if (signedIn.status !== 302) throw new Error(`sign-in answered ${signedIn.status}`);
  const cookie = client.cookieHeader();

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

  // The largest chart body of the demo logs (identity), and its drive log.
  let chosen = { path: "", page: "", body: Buffer.alloc(0), fileName: "" };
  for (const log of logs.filter((l) => l.status === "done")) {
    const path = `/vehicles/${log.vehicleId}/logs/${log.id}/charts.json`;
    const r = await fetch(base + path, { headers: { Cookie: cookie } });
    if (r.status !== 200) throw new Error(`${path} answered ${r.status}`);
    const body = Buffer.from(await r.arrayBuffer());
    if (body.length > chosen.body.length)
      chosen = { path, page: path.replace(/\/charts\.json$/, ""), body, fileName: log.fileName };
  }
  writeFileSync(staticFile, chosen.body);
  /** One request as sent (node:http does not inflate): status, ETag, coding and bytes on the wire. */
  const sized = (path: string, encoding: string) =>
    new Promise<{ etag: string | null; bytes: number }>((resolve, reject) => {
      const headers = { Cookie: cookie, "Accept-Encoding": encoding };
      const req = request(base + path, { headers }, (res) => {
        let bytes = 0;
        res.on("data", (c: Buffer) => (bytes += c.length));
        res.on("end", () => {
          if (res.statusCode !== 200) reject(new Error(`${path} answered ${res.statusCode}`));
          const etag = res.headers.etag ?? null;
          resolve({ etag, bytes });
        });
      });
      req.on("error", reject);
      req.end();
    });

  const load = async (path: string, headers: Record<string, string>, connections: number) => {
    const cpu0 = cpuSeconds(pid);
    const result = await autocannon({
      url: base + path,
      connections,
      duration: SECONDS,
      headers: { Cookie: cookie, ...headers },
      timeout: 10,
    });
    // requests.total: the answered requests (autocannon 8 aggregateResult.js).
    const answered = (result.requests as unknown as { total: number }).total;
    const cpuMs = ((cpuSeconds(pid) - cpu0) * 1000) / Math.max(1, answered);
    return { result, cpuMs } satisfies Row;
  };

  const encodings = ["gzip", "br"];
  const rows = new Map<string, Row[]>();
  const add = (key: string, row: Row) => rows.set(key, [...(rows.get(key) ?? []), row]);
  // Warm both (the first chart request builds and compresses the body).
  await sized(chosen.path, "gzip");
  await sized(chosen.path, "br");
  const sizes = new Map<string, { json: number; static: number }>();
  for (const enc of encodings)
    sizes.set(enc, {
      json: (await sized(chosen.path, enc)).bytes,
      static: (await sized(`/${STATIC_NAME}`, enc)).bytes,
    });
  for (let round = 0; round < (PARTS.has("json") ? ROUNDS : 0); round++) {
    for (const enc of encodings) {
      add(`json ${enc}`, await load(chosen.path, { "Accept-Encoding": enc }, CONNECTIONS));
      add(`static ${enc}`, await load(`/${STATIC_NAME}`, { "Accept-Encoding": enc }, CONNECTIONS));
    }
    process.stderr.write(`  (round ${round + 1} of ${ROUNDS} done)\n`);
  }
  const { etag } = await sized(chosen.path, "gzip");
  const notModified: Row[] = [];
  if (etag && PARTS.has("304"))
    for (let round = 0; round < ROUNDS; round++)
      notModified.push(
        await load(chosen.path, { "Accept-Encoding": "gzip", "If-None-Match": etag }, CONNECTIONS),
      );

  // The session and team lookup alone, as every signed-in request makes it.
  const { getCurrentUser } = await import("../app/lib/http/access.server.ts");
  // A new Request each time: what one request has read is kept for that request only.
  const lookupRequest = () => new Request(base + chosen.path, { headers: { Cookie: cookie } });
  for (let i = 0; i < 200; i++) await getCurrentUser(lookupRequest());
  const calls = 2000;
  const cpuBefore = process.cpuUsage();
  const l0 = performance.now();
  for (let i = 0; i < (PARTS.has("lookup") ? calls : 0); i++)
    if (!(await getCurrentUser(lookupRequest()))) throw new Error("the lookup found no session");
  const lookupMs = (performance.now() - l0) / calls;
  const lookupCpu = process.cpuUsage(cpuBefore);
  const lookupCpuMs = (lookupCpu.user + lookupCpu.system) / 1000 / calls;
  await pool.end();

  // Also at 10 connections: the per-request cost where 100 would only queue (or time out).
  const page: Row[] = [];
  const fewPage: Row[] = [];
  for (let round = 0; round < (PARTS.has("page") ? ROUNDS : 0); round++) {
    page.push(await load(chosen.page, { "Accept-Encoding": "gzip" }, PAGE_CONNECTIONS));
    fewPage.push(await load(chosen.page, { "Accept-Encoding": "gzip" }, 10));
  }

  const pick = (list: Row[]) => {
    const mid = list.find(
      (r) => r.result.requests.average === median(list.map((x) => x.result.requests.average)),
    )!;
    return mid;
  };
  /** Errors, timeouts and non-2xx answers of a run (a 304 counts as an answer). */
  const faults = ({ result: r }: Row) =>
    `${r.errors - r.timeouts}/${r.timeouts}/${r.non2xx - (r.statusCodeStats["304"]?.count ?? 0)}`;

  console.log(
    `\ncharts: ${chosen.fileName}, chart JSON ${(chosen.body.length / 1024).toFixed(1)} KB, ${CONNECTIONS} connections, ${SECONDS} s per run, median of ${ROUNDS} runs, signed in`,
  );
  console.log(
    `  machine: ${availableParallelism()} cores, load average ${loadavg()[0]!.toFixed(1)} (1 min) at the end; autocannon runs in this process`,
  );
  console.log(
    "  what                          bytes sent   req/s   p50 ms  p97.5 ms  server CPU ms/req  err/tmo/non2xx",
  );
  const line = (label: string, bytes: number | string, list: Row[]) => {
    const { result: r, cpuMs } = pick(list);
    console.log(
      `  ${label.padEnd(29)} ${String(bytes).padStart(10)} ${num(r.requests.average, 7, 1)} ${num(r.latency.p50, 8)} ${num(r.latency.p97_5, 9)} ${num(cpuMs, 18, 2)} ${faults(pick(list)).padStart(10)}`,
    );
    return r.requests.average;
  };
  for (const enc of PARTS.has("json") ? encodings : []) {
    const size = sizes.get(enc)!;
    const json = line(`charts.json (${enc})`, size.json, rows.get(`json ${enc}`)!);
    const file = line(`static copy (${enc})`, size.static, rows.get(`static ${enc}`)!);
    console.log(
      `    ratio chart JSON / static file (${enc}): ${(json / file).toFixed(2)}  (goal ≥ 0.8)  ${json / file >= 0.8 ? "ok" : "MISSED"}`,
    );
    ratioLine("4", `chart JSON vs static file, ${enc}`, json, "req/s", file, "≥ 0.8");
  }
  if (notModified.length) {
    const { result: r } = pick(notModified);
    const got304 = notModified.every((x) => (x.result.statusCodeStats["304"]?.count ?? 0) > 0);
    const rate304 = line("charts.json If-None-Match", 0, notModified);
    ratioLine(
      "4",
      "chart JSON answered 304 (If-None-Match)",
      rate304,
      "req/s",
      null,
      "304 on every analysis JSON",
    );
    console.log(
      `    answered 304: ${got304 ? "yes" : "NO"} (${r.statusCodeStats["304"]?.count ?? 0} in the median run)`,
    );
  } else if (!etag) console.log("  charts.json If-None-Match: no ETag on the answer (MISSED)");
  if (PARTS.has("lookup"))
    console.log(
      `  session + team lookup (getCurrentUser), 1 at a time in this process: ${lookupMs.toFixed(3)} ms per call, ${lookupCpuMs.toFixed(3)} ms CPU per call`,
    );
  const jsonCpu = rows.has("json gzip") ? pick(rows.get("json gzip")!).cpuMs : NaN;
  if (PARTS.has("lookup") && rows.has("json gzip"))
    console.log(
      `    beside the server's ${jsonCpu.toFixed(2)} CPU ms per chart request (gzip): ${((100 * lookupCpuMs) / jsonCpu).toFixed(0)} % (the database's own CPU comes on top)`,
    );
  if (PARTS.has("lookup") && rows.has("json gzip"))
    ratioLine(
      "4",
      "session + team lookup CPU vs a chart request's CPU",
      lookupCpuMs,
      "ms",
      jsonCpu,
      "small",
    );
  if (page.length) {
    const pageRate = line(`drive-log page (${PAGE_CONNECTIONS} conns)`, "html", page);
    const p975 = pick(page).result.latency.p97_5;
    const codes = Object.entries(pick(page).result.statusCodeStats);
    console.log(`    answers: ${codes.map(([c, x]) => `${x.count}× ${c}`).join(", ") || "none"}`);
    console.log(
      `    goal ≥ 150 req/s and p97.5 < 1000 ms: ${pageRate >= 150 && p975 < 1000 ? "ok" : "MISSED"}`,
    );
    ratioLine(
      "5",
      `drive-log page, ${PAGE_CONNECTIONS} connections`,
      pageRate,
      "req/s",
      150,
      "≥ 1",
    );
    ratioLine(
      "5",
      `drive-log page p97.5, ${PAGE_CONNECTIONS} connections`,
      p975,
      "ms",
      1000,
      "< 1",
    );
    line("drive-log page (10 conns)", "html", fewPage);
  }
  console.log(
    "  (req/s: answered per second; p50/p97.5: latency; server CPU: the server process's user+system time over the run ÷ requests; err/tmo/non2xx: connection errors, timeouts (no answer in 10 s), answers other than 2xx and 304, in the median run)",
  );
} finally {
  rmSync(staticFile, { force: true });
  await cleanUp(setup, server);
}
