/**
 * `npm run bench -- s3`: a 100 MB drive-log-like file put into the S3 store on the local
 * stand-in (scripts/s3-stand-in.ts, in this process) and read back, against the local folder
 * store (docs/s3-storage.md, Figures). Each put runs in a process of its own, 3 times per store
 * (median), so its peak RSS is its own; an empty put shows the process's size without a file.
 * Goal (issue 18): streaming — peak RSS does not grow with the file (BENCH_S3_MB, default 100).
 */
import { spawn } from "node:child_process";
import { createCipheriv } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { ratioLine } from "./goal-lines.ts";

const MB = Number(process.env.BENCH_S3_MB ?? 100);
type Run = { putS: number; readS: number; peakMB: number };

if (process.argv[2] === "put") {
  // The child: one put and one read of `mb` MB, half noise and half a repeated CSV line.
  const [, , , kind, where, mb] = process.argv as string[];
  process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED = "true";
  const { blobStoreFrom } = await import("../app/lib/infra/storage.server.ts");
  const store = blobStoreFrom(
    kind === "s3"
      ? {
          kind: "s3",
          bucket: "bench",
          region: "us-east-1",
          endpoint: where!,
          prefix: `${process.pid}/`,
        }
      : { kind: "local", root: where! },
  );
  const total = Number(mb) * 1e6;
  const noise = createCipheriv("aes-256-ctr", Buffer.alloc(32, 7), Buffer.alloc(16));
  const line = Buffer.from("0.001,800.1,799.8\n".repeat(60_000)).subarray(0, 1 << 20);
  function* source() {
    for (let at = 0, i = 0; at < total; at += 1 << 20, i++) {
      const n = Math.min(1 << 20, total - at);
      yield i % 2 ? line.subarray(0, n) : noise.update(Buffer.alloc(n));
    }
  }
  const t0 = performance.now();
  const stored = await store.put(Readable.from(source()));
  const t1 = performance.now();
  for await (const _ of store.read(stored.key));
  const t2 = performance.now();
  const peakMB = process.resourceUsage().maxRSS / 1024;
  console.log(JSON.stringify({ putS: (t1 - t0) / 1000, readS: (t2 - t1) / 1000, peakMB }));
  process.exit(0);
}

const { startS3StandIn } = await import("../scripts/s3-stand-in.ts");
const dir = mkdtempSync(join(tmpdir(), "twistlog-bench-s3-"));
const standIn = await startS3StandIn({ port: 0, dir: join(dir, "s3"), bucket: "bench" });
const self = fileURLToPath(import.meta.url);
const env = { ...process.env, AWS_ACCESS_KEY_ID: "S3RVER", AWS_SECRET_ACCESS_KEY: "S3RVER" };

/** One child's figures (spawn, not spawnSync: the stand-in in this process must keep answering). */
async function once(kind: string, where: string, mb: number): Promise<Run> {
  const child = spawn(process.execPath, ["--import", "tsx", self, "put", kind, where, `${mb}`], {
    env,
    stdio: ["ignore", "pipe", "inherit"],
  });
  let out = "";
  child.stdout.on("data", (d: Buffer) => (out += d));
  await new Promise((resolve) => child.on("close", resolve));
  return JSON.parse(out.trim().split("\n").at(-1)!) as Run;
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
async function medianOf3(kind: string, where: string, mb: number) {
  const runs: Run[] = [];
  for (let i = 0; i < 3; i++) runs.push(await once(kind, where, mb));
  return {
    putS: median(runs.map((r) => r.putS)),
    readS: median(runs.map((r) => r.readS)),
    peakMB: median(runs.map((r) => r.peakMB)),
  };
}

try {
  const s3 = await medianOf3("s3", standIn.endpoint, MB);
  const s3Empty = await once("s3", standIn.endpoint, 0);
  const local = await medianOf3("local", join(dir, "local"), MB);
  const f = (x: number) => x.toFixed(2);
  console.log(`${MB} MB, median of 3 (2 shared cores: noisy)`);
  console.log(
    `  S3 stand-in:  put ${f(s3.putS)} s, read ${f(s3.readS)} s, peak RSS ${s3.peakMB.toFixed(0)} MB (empty put: ${s3Empty.peakMB.toFixed(0)} MB)`,
  );
  console.log(
    `  local folder: put ${f(local.putS)} s, read ${f(local.readS)} s, peak RSS ${local.peakMB.toFixed(0)} MB`,
  );
  ratioLine("S3", `${MB} MB put, S3 stand-in vs local folder`, s3.putS, "s", local.putS, "—");
  ratioLine(
    "S3",
    `${MB} MB put, peak RSS above an empty put`,
    s3.peakMB - s3Empty.peakMB,
    "MB",
    null,
    "independent of size",
  );
} finally {
  await standIn.stop();
  rmSync(dir, { recursive: true, force: true });
}
