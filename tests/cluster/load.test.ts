/**
 * Issue 18, "Must show": the load test of the hardening issue (bench/load.bench.ts) through
 * HAProxy, with both app instances behind it and then with one (the other set to maintenance
 * in HAProxy, so the path — load balancer included — is the same). autocannon keeps
 * LOAD_CONNECTIONS (default 100) connections busy for LOAD_SECONDS (default 15) on a drive
 * log's chart JSON and on its page, while LOAD_UPLOADS (default 4) technicians upload few-MB
 * logs by API token in a loop. Prints requests/s and p97.5 side by side. The test fails on any
 * error, timeout or non-2xx answer; the figures themselves are reported, never asserted (no
 * wall-clock limits in tests: a shared 2-core machine says little about a cluster's speed).
 */
import { mkdtempSync, rmSync } from "node:fs";
import { availableParallelism, loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import autocannon, { type Result } from "autocannon";
import { afterAll, describe, expect, it } from "vitest";
import { writeBenchLog } from "../../bench/drive-log";
import { TEST_PASSWORD } from "../support/accounts";
import { HttpClient } from "../support/http-client";
import { repoRoot } from "../support/processes";
import { apiJson, clusterCommand, clusterTeam, sleep, uploadLog, web } from "./cluster";

const SECONDS = Number(process.env.LOAD_SECONDS ?? 15);
const CONNECTIONS = Number(process.env.LOAD_CONNECTIONS ?? 100);
const UPLOADERS = Number(process.env.LOAD_UPLOADS ?? 4);
const DEMO_LOG = join(repoRoot, "samples/kestrel-kst-d4-runup-3rd-full-load-damper-a.csv");

const { team, vehicleId, technician } = await clusterTeam("Load");
const dir = mkdtempSync(join(tmpdir(), "twistlog-cluster-load-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const upload = (path: string, name: string) =>
  uploadLog(web, { vehicleId, token: technician, condition: "run-up" }, path, name);

describe("the hardening load test through HAProxy: two instances against one", () => {
  it("serves every request with 2xx in both configurations, and prints the figures", async () => {
    const first = await upload(DEMO_LOG, "kst-d4-runup.csv");
    expect(first.status).toBe(202);
    const logId = first.body.log.id;
    for (let status = ""; status !== "done"; await sleep(500)) {
      status = (
        await apiJson<{ log: { status: string } }>(web, `/api/v1/logs/${logId}`, technician)
      ).body.log.status;
      expect(status).not.toBe("failed");
    }
    const client = await HttpClient.signedIn(web, team.accounts.engineer.email, TEST_PASSWORD);
    const headers = { Cookie: client.cookieHeader(), "Accept-Encoding": "gzip" };
    const targets = [
      { label: "chart JSON", path: `/vehicles/${vehicleId}/logs/${logId}/charts.json` },
      { label: "drive-log page", path: `/vehicles/${vehicleId}/logs/${logId}` },
    ];

    // Distinct logs (10–13 s at 5 kHz, 2–3 MB), so no upload is a copy of another's.
    const files = Array.from({ length: UPLOADERS }, (_, i) => {
      const path = join(dir, `load-${i}.csv`);
      writeBenchLog(path, { durationS: 10 + i, sampleRateHz: 5000, order: 2 });
      return path;
    });
    let uploading = true;
    const uploads = { accepted: 0, other: [] as string[] };
    const uploaders = files.map(async (path, i) => {
      for (let n = 0; uploading; n++) {
        try {
          const r = await upload(path, `load-${i}-${n}.csv`);
          if (r.status === 202) uploads.accepted++;
          else uploads.other.push(String(r.status));
        } catch (error) {
          uploads.other.push((error as Error).message);
        }
      }
    });

    const rows: { instances: number; label: string; result: Result }[] = [];
    try {
      for (const instances of [2, 1]) {
        clusterCommand(...(instances === 2 ? ["all-apps"] : ["only-app", "1"]));
        for (const t of targets) {
          const result = await autocannon({
            url: web + t.path,
            connections: CONNECTIONS,
            duration: SECONDS,
            headers,
            timeout: 10,
          });
          rows.push({ instances, label: t.label, result });
        }
      }
    } finally {
      clusterCommand("all-apps");
      uploading = false;
      await Promise.all(uploaders);
    }

    // The uploads' analyses finish before the next test file starts on a quiet cluster.
    const drainFrom = performance.now();
    for (let pending = 1; pending > 0;) {
      const r = await apiJson<{ logs: { status: string }[] }>(
        web,
        `/api/v1/vehicles/${vehicleId}/logs`,
        technician,
      );
      pending =
        r.body?.logs.filter((l) => l.status === "queued" || l.status === "running").length ?? 1;
      if (pending > 0) await sleep(1000);
    }
    const drainS = (performance.now() - drainFrom) / 1000;

    const num = (n: number, w: number, d = 0) => n.toFixed(d).padStart(w);
    const lines = [
      `load through HAProxy: ${CONNECTIONS} connections, ${SECONDS} s per row, ${UPLOADERS} uploaders meanwhile`,
      `  machine: ${availableParallelism()} cores, load average ${loadavg()[0]!.toFixed(1)} (1 min) — the instances, the Galera nodes, HAProxy and autocannon share them`,
      "  route            instances   req/s   p50 ms  p97.5 ms  non-2xx  errors",
    ];
    for (const { instances, label, result: r } of rows)
      lines.push(
        `  ${label.padEnd(16)} ${num(instances, 9)} ${num(r.requests.average, 7, 1)} ${num(r.latency.p50, 8)} ${num(r.latency.p97_5, 9)} ${num(r.non2xx, 8)} ${num(r.errors, 7)}`,
      );
    for (const t of targets) {
      const [two, one] = [2, 1].map(
        (n) => rows.find((r) => r.instances === n && r.label === t.label)!.result,
      );
      lines.push(
        `  ${t.label}: two instances / one = ${(two!.requests.average / one!.requests.average).toFixed(2)} × requests/s, p97.5 ${(two!.latency.p97_5 / one!.latency.p97_5).toFixed(2)} ×`,
      );
    }
    lines.push(
      `  uploads meanwhile: ${uploads.accepted} accepted, other answers: ${uploads.other.join(", ") || "none"}; their analyses were all done ${drainS.toFixed(0)} s after the load`,
    );
    process.stderr.write(`\n${lines.join("\n")}\n`);

    for (const { instances, label, result: r } of rows) {
      expect(r.errors, `${label} with ${instances}`).toBe(0);
      expect(r.non2xx, `${label} with ${instances}`).toBe(0);
      expect(r["2xx"], `${label} with ${instances}`).toBeGreaterThan(0);
    }
    expect(uploads.other).toEqual([]);
  });
});
