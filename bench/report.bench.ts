/**
 * `npm run bench` (last part): the evidence report of a vehicle with 20 drive logs (issue 16).
 * Analyses the three analytic fixture logs of tests/support/report-fixture.ts once, repeats them
 * as 20 drive logs with their own names and hashes, and renders the report in a fresh Node
 * process that does nothing else, so its peak memory is the renderer's. Prints the generation
 * time (first render in the process, then the median of 3 more), the process' peak resident
 * memory (process.resourceUsage().maxRSS) and its resident memory before rendering, the PDF's
 * size and its page count (read back with pdfjs-dist). Figures only, no limits.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const LOGS = 20;
const RUNS = 3;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const mb = (kb: number) => (kb / 1024).toFixed(0);

if (process.argv[2] === "--render") {
  // The child: load the model, render it 1 + RUNS times, print figures as JSON.
  const { renderEvidenceReport } = await import("../app/lib/report/evidence-report.ts");
  const model = JSON.parse(readFileSync(process.argv[3]!, "utf8"));
  const rssBeforeKb = process.memoryUsage().rss / 1024;
  let t = performance.now();
  let pdf = await renderEvidenceReport(model);
  const firstMs = performance.now() - t;
  const times: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    t = performance.now();
    pdf = await renderEvidenceReport(model);
    times.push(performance.now() - t);
  }
  writeFileSync(process.argv[4]!, pdf);
  console.log(
    JSON.stringify({
      firstMs,
      medianMs: median(times),
      rssBeforeKb,
      maxRssKb: process.resourceUsage().maxRSS,
      bytes: pdf.length,
    }),
  );
} else {
  const { fixtureLogs, fixtureModel, manyLogs } =
    await import("../tests/support/report-fixture.ts");
  const model = fixtureModel({
    logs: manyLogs(fixtureLogs(), LOGS),
    state: "proposed",
    draft: true,
    note: "Bench: 20 drive logs of the Kestrel D4, damper variant DMF-B2.",
  });
  const dir = mkdtempSync(join(tmpdir(), "twistlog-report-bench-"));
  try {
    const modelPath = join(dir, "model.json");
    const pdfPath = join(dir, "report.pdf");
    writeFileSync(modelPath, JSON.stringify(model));
    const child = spawnSync(
      process.execPath,
      ["--import", "tsx", fileURLToPath(import.meta.url), "--render", modelPath, pdfPath],
      { encoding: "utf8" },
    );
    if (child.status !== 0) throw new Error(`the render process failed:\n${child.stderr}`);
    const figures = JSON.parse(child.stdout.trim().split("\n").at(-1)!) as {
      firstMs: number;
      medianMs: number;
      rssBeforeKb: number;
      maxRssKb: number;
      bytes: number;
    };
    const pdfjs = await import("pdfjs-dist/legacy/build/pdf.mjs");
    const doc = await pdfjs.getDocument({
      data: new Uint8Array(readFileSync(pdfPath)),
      verbosity: 0,
    }).promise;
    const pages = doc.numPages;
    await doc.destroy();
    console.log(`\nreport: evidence report of a vehicle with ${LOGS} drive logs (pdfkit)`);
    console.log(`  first render in a fresh process   ${figures.firstMs.toFixed(0)} ms`);
    console.log(`  median of ${RUNS} further renders      ${figures.medianMs.toFixed(0)} ms`);
    console.log(
      `  peak resident memory              ${mb(figures.maxRssKb)} MB (${mb(figures.rssBeforeKb)} MB before rendering)`,
    );
    console.log(`  PDF size                          ${(figures.bytes / 1024).toFixed(0)} KB`);
    console.log(`  pages (read by pdfjs-dist)        ${pages}`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
