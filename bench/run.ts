/**
 * `npm run bench`: runs every bench in its own process, one after the other (so one bench's
 * memory never counts in the next one's peak RSS), passes their output through, and ends with
 * the goal lines they printed (bench/goal-lines.ts) gathered in one table, by goal.
 * `npm run bench -- NAME …` runs only the benches whose file names contain NAME.
 */
import { spawn } from "node:child_process";
import { fileURLToPath } from "node:url";

const BENCHES = [
  "analyse",
  "analyse-samples",
  "ingest-samples",
  "cli",
  "large-log",
  "vold-kalman",
  "mdf4",
  "upload",
  "reanalyse",
  "charts",
  "load",
  "report",
  "s3-store",
];
const root = fileURLToPath(new URL("..", import.meta.url));
const only = process.argv.slice(2);
const chosen = only.length ? BENCHES.filter((b) => only.some((o) => b.includes(o))) : BENCHES;

const goals: string[] = [];
const failed: string[] = [];
for (const name of chosen) {
  const file = `bench/${name}.bench.ts`;
  console.log(`\n=== ${file}`);
  const code = await new Promise<number>((resolve) => {
    const child = spawn(process.execPath, ["--import", "tsx", file], {
      cwd: root,
      stdio: ["ignore", "pipe", "inherit"],
    });
    let rest = "";
    child.stdout.on("data", (d: Buffer) => {
      process.stdout.write(d);
      const lines = (rest + d.toString()).split("\n");
      rest = lines.pop() ?? "";
      goals.push(...lines.filter((l) => l.startsWith("GOAL ")));
    });
    child.on("close", (c) => {
      if (rest.startsWith("GOAL ")) goals.push(rest);
      resolve(c ?? 1);
    });
  });
  if (code !== 0) failed.push(`${file} (exit ${code})`);
}
console.log("\n=== goals (figure, reference in the same run, ratio)");
const goalOf = (l: string) => Number(/^GOAL (\d+)/.exec(l)?.[1] ?? 99);
for (const line of [...goals].sort((a, b) => goalOf(a) - goalOf(b))) console.log(line);
if (failed.length) {
  console.log(`\nbenches that failed: ${failed.join(", ")}`);
  process.exitCode = 1;
}
