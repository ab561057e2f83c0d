import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { writeBenchLog } from "../../../bench/drive-log.ts";
import { cliTempDir } from "../../../tests/support/cli-process.ts";
import { integrateAngle, chooseAngleGrid } from "./angle-grid.ts";
import { blockHelperJobs, startBlockHelper, stopBlockHelper } from "./block-helper.ts";
import { trackBlocks } from "./order-tracking.ts";
import { analyseSource } from "./pipeline.ts";
import { float64Array } from "./shared-arrays.ts";

// The block helper (a second thread computing the later order-tracking blocks) against the
// one-thread computation: every value the same, bit for bit. The one-thread order tracking is
// held against analytic signals in order-tracking.test.ts; here it is the reference.
const dir = cliTempDir("twistlog-blocks-");
afterAll(stopBlockHelper);
// Whole analyses on a shared machine: a generous timeout, not a speed check.
const SLOW = { timeout: 300_000 };

/** A 20 s run-up 900 → 3000 rpm with an order-2 fluctuation, 5 kHz, in shared memory. */
function runUp() {
  const fs = 5000;
  const n = 20 * fs;
  const timeS = float64Array(n);
  const crank = float64Array(n);
  const gear = float64Array(n);
  let theta = 0;
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    const w = ((900 + 105 * t) * 2 * Math.PI) / 60;
    theta += w / fs;
    timeS[i] = t;
    crank[i] = w + 2 * Math.sin(2 * theta);
    gear[i] = w + 0.5 * Math.sin(2 * theta - 0.3);
  }
  return { timeS, crank, gear };
}

describe("the block helper", SLOW, () => {
  it("gives trackBlocks the same blocks as one thread, on a run-up (R = 8, 50 % and 75 % overlap)", () => {
    startBlockHelper();
    const { timeS, crank, gear } = runUp();
    const angleRad = integrateAngle(timeS, crank);
    const grid = chooseAngleGrid({ sampleRateHz: 5000, maxRadS: 320, topOrder: 4 });
    for (const overlap of [0.5, 0.75]) {
      const args = {
        timeS,
        angleRad,
        crankRadS: crank,
        gearboxRadS: gear,
        grid,
        revsPerBlock: 8,
        overlap,
        topBin: 34,
        firingBin: 16,
      };
      const before = blockHelperJobs();
      const helped = trackBlocks(args);
      expect(blockHelperJobs()).toBe(before + 1);
      const plain = trackBlocks({
        ...args,
        timeS: Float64Array.from(timeS), // ordinary memory: the helper cannot take these
        angleRad: Float64Array.from(angleRad),
      });
      expect(blockHelperJobs()).toBe(before + 1);
      expect(helped.blockCount).toBe(plain.blockCount);
      expect(Array.from(helped.crankAmp)).toEqual(Array.from(plain.crankAmp));
      expect(Array.from(helped.gearboxAmp)).toEqual(Array.from(plain.gearboxAmp));
      expect(Array.from(helped.twistRadS ?? [])).toEqual(Array.from(plain.twistRadS ?? []));
      expect(Array.from(helped.blockRadS)).toEqual(Array.from(plain.blockRadS));
      expect(Array.from(helped.blockStartS)).toEqual(Array.from(plain.blockStartS));
      expect(helped.samplesPerRevRange).toEqual(plain.samplesPerRevRange);
      expect(helped.droppedSlowBlocks).toBe(plain.droppedSlowBlocks);
    }
  });

  it("leaves the whole analysis of the bench log as it was", async () => {
    const log = join(dir, "bench-60s.csv");
    writeBenchLog(log, { durationS: 60, sampleRateHz: 5000, order: 2 });
    await stopBlockHelper();
    const one = await analyseSource({ source: log, ingest: {}, analysis: {} });
    startBlockHelper();
    const before = blockHelperJobs();
    const two = await analyseSource({ source: log, ingest: {}, analysis: {} });
    expect(blockHelperJobs()).toBeGreaterThan(before);
    expect(two.ok && JSON.stringify(two.value.result)).toBe(
      one.ok && JSON.stringify(one.value.result),
    );
  });
});
