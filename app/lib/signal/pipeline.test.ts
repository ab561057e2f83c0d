/**
 * The pipeline's two ways through (pipeline.ts): a log analysed in memory and the same log
 * spooled and analysed in windows give the same result document (issue 17: within 0.01 dB;
 * tests/support/result-differences.ts), and the same log info and warnings, whether the log
 * comes as a file path or as a stream (the server's way). Logs: a demo sample CSV and the MDF4
 * fixture written by the fixture builder (tests/fixtures/mdf4/README.md).
 */
import { createReadStream, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { differences } from "../../../tests/support/result-differences.ts";
import type { IngestOptions } from "./ingest.ts";
import { analyseSource, type PipelineInput } from "./pipeline.ts";

const ROOT = join(import.meta.dirname, "../../..");
/** Each log with the ingest options it needs (the MDF4 fixture's channel names say no role). */
const LOGS: [string, IngestOptions][] = [
  ["samples/kestrel-kst-p3-runup-3rd-full-load-damper-a.csv", {}],
  [
    "tests/fixtures/mdf4/drive-log-deflate.mf4",
    { crankColumn: "EngSpd", gearboxColumn: "GbxInpShaftSpd" },
  ],
];

async function both(input: PipelineInput) {
  const whole = await analyseSource({ ...input, inMemoryLimitBytes: Number.MAX_SAFE_INTEGER });
  const windows = await analyseSource({ ...input, inMemoryLimitBytes: 0 });
  if (!whole.ok || !windows.ok) throw new Error("an analysis failed");
  return { whole: whole.value, windows: windows.value };
}

describe("analyseSource in memory and in windows", () => {
  for (const [rel, ingest] of LOGS) {
    const path = join(ROOT, rel);
    it(`gives the same result for ${rel} read from its path`, async () => {
      const { whole, windows } = await both({ source: path, ingest, analysis: {} });
      expect([whole.way, windows.way]).toEqual(["memory", "windows"]);
      expect(whole.result.blocks).toBeGreaterThan(10);
      expect(differences(whole.result, windows.result)).toEqual([]);
      expect(windows.log).toEqual(whole.log);
      expect(whole.log).not.toHaveProperty("timeS");
    });

    it(`gives the same result for ${rel} read as a stream of the stated size`, async () => {
      const sizeHintBytes = statSync(path).size;
      const stream = () => createReadStream(path, { highWaterMark: 7919 });
      const whole = await analyseSource({
        source: stream(),
        ingest: { ...ingest, sizeHintBytes },
        analysis: {},
        inMemoryLimitBytes: sizeHintBytes,
      });
      const windows = await analyseSource({
        source: stream(),
        ingest: { ...ingest, sizeHintBytes },
        analysis: {},
        inMemoryLimitBytes: sizeHintBytes - 1,
      });
      if (!whole.ok || !windows.ok) throw new Error("an analysis failed");
      expect([whole.value.way, windows.value.way]).toEqual(["memory", "windows"]);
      expect(differences(whole.value.result, windows.value.result)).toEqual([]);
      expect(windows.warnings).toEqual(whole.warnings);
    });
  }

  it("says what is wrong with a missing file either way", async () => {
    const missing = join(ROOT, "samples/no-such-log.csv");
    for (const inMemoryLimitBytes of [0, Number.MAX_SAFE_INTEGER]) {
      const r = await analyseSource({
        source: missing,
        ingest: {},
        analysis: {},
        inMemoryLimitBytes,
      });
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error.code).toBe("file_not_found");
    }
  });
});
