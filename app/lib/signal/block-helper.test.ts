import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { writeBenchLog } from "../../../bench/drive-log.ts";
import { cliTempDir } from "../../../tests/support/cli-process.ts";
import { integrateAngle, chooseAngleGrid } from "./angle-grid.ts";
import {
  blockHelperJobs,
  helpedAngle,
  helpedFiltfilt,
  helpedTransients,
  startBlockHelper,
  stopBlockHelper,
} from "./block-helper.ts";
import { butterworthLowpass4, filtfilt } from "./lowpass.ts";
import { analyseTransients } from "./transient-analysis.ts";
import type { DriveLog } from "./types.ts";
import { trackBlocks } from "./order-tracking.ts";
import { analyseSource } from "./pipeline.ts";
import { float64Array } from "./shared-arrays.ts";

// The block helper (a second thread low-passing one channel, computing the later order-tracking
// blocks, then the transients) against the one-thread computation: every value the same, bit
// for bit. The one-thread order tracking is
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

/**
 * A 5 kHz log of n samples in shared memory: the crank at `rpmAt(i)` rpm at sample i plus an
 * order-2 fluctuation of 3 rad/s, the gearbox at the same speed with 1 rad/s at −0.4 rad;
 * `timeAt(i)` the time of sample i, s (default i / fs).
 */
function speedLog(n: number, rpmAt: (t: number) => number, timeAt = (i: number) => i / 5000) {
  const fs = 5000;
  const [timeS, crankRadS, gearboxRadS] = [float64Array(n), float64Array(n), float64Array(n)];
  let theta = 0;
  for (let i = 0; i < n; i++) {
    const w = (rpmAt(i) * 2 * Math.PI) / 60;
    theta += w / fs;
    timeS[i] = timeAt(i);
    crankRadS[i] = w + 3 * Math.sin(2 * theta);
    gearboxRadS[i] = w + 1 * Math.sin(2 * theta - 0.4);
  }
  return {
    timeS,
    crankRadS,
    gearboxRadS,
    extra: {},
    sampleRateHz: fs,
    source: {} as DriveLog["source"],
  };
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

  it("low-passes a channel as filtfilt does on one thread, bit for bit", () => {
    startBlockHelper();
    const { gear } = runUp();
    const filters = butterworthLowpass4(400, 5000);
    const before = blockHelperJobs();
    const helped = helpedFiltfilt(gear, filters)?.wait();
    expect(blockHelperJobs()).toBe(before + 1);
    expect(helped).toBeDefined();
    expect(Array.from(helped!)).toEqual(Array.from(filtfilt(gear, filters)));
  });

  it("integrates the crank angle as integrateAngle does on one thread, bit for bit", () => {
    startBlockHelper();
    const { timeS, crank } = runUp();
    const before = blockHelperJobs();
    const helped = helpedAngle(timeS, crank)?.wait();
    expect(blockHelperJobs()).toBe(before + 1);
    expect(helped).toBeDefined();
    expect(Array.from(helped!)).toEqual(Array.from(integrateAngle(timeS, crank)));
  });

  it("measures the transients of a cranking start as analyseTransients does on one thread", () => {
    startBlockHelper();
    // 0.6 s of cranking at 250 rpm, then a start to 850 rpm within 0.4 s: a fast span.
    const fs = 5000;
    const log = speedLog(4 * fs, (i) => {
      const t = i / fs;
      return t < 0.6 ? 250 : t < 1 ? 250 + (600 * (t - 0.6)) / 0.4 : 850;
    });
    const { timeS, crankRadS } = log;
    const args = {
      log,
      angleRad: integrateAngle(timeS, crankRadS),
      filters: butterworthLowpass4(200, fs),
      grid: chooseAngleGrid({ sampleRateHz: fs, maxRadS: 100, topOrder: 4 }),
      order: 2,
      revsPerBlock: 8,
      binRpm: 50,
      idleRpm: 850,
    };
    const before = blockHelperJobs();
    const helped = helpedTransients(args)?.wait();
    expect(blockHelperJobs()).toBe(before + 1);
    const local = analyseTransients(args);
    expect(local.spans.length).toBeGreaterThan(0);
    expect(helped).toEqual(local);
  });

  it("shares the spans of a log in two sections with the caller and gives the one-thread part", () => {
    startBlockHelper();
    // Two 6 s stretches 10 s apart (a gap: two sections), each a cranking start to 850 rpm, a
    // pull to 2500 rpm and a drop back: three fast spans each, claimed by either thread.
    const fs = 5000;
    const per = 6 * fs;
    const stretch = speedLog(
      2 * per,
      (i) => {
        const t = (i % per) / fs;
        return t < 0.6
          ? 250
          : t < 1
            ? 250 + 1500 * (t - 0.6)
            : t < 2.5
              ? 850
              : t < 3.5
                ? 850 + 1650 * (t - 2.5)
                : t < 4.5
                  ? 2500
                  : t < 5
                    ? 2500 - 3300 * (t - 4.5)
                    : 850;
      },
      (i) => (i < per ? 0 : 16) + (i % per) / fs,
    );
    const { timeS } = stretch;
    const sections = [0, per].map((a) => ({
      startIndex: a,
      endIndex: a + per,
      startS: timeS[a]!,
      endS: timeS[a + per - 1]!,
    }));
    const log = { ...stretch, sections };
    const args = {
      log,
      filters: butterworthLowpass4(300, fs),
      grid: chooseAngleGrid({ sampleRateHz: fs, maxRadS: 300, topOrder: 4 }),
      order: 2,
      revsPerBlock: 8,
      binRpm: 50,
      idleRpm: 850,
    };
    const helped = helpedTransients(args)?.wait();
    const local = analyseTransients(args);
    expect(local.spans.length).toBeGreaterThanOrEqual(4);
    expect(local.events.length).toBeGreaterThanOrEqual(2);
    expect(helped).toEqual(local);
  });

  it("leaves the whole analysis of the bench log as it was", async () => {
    const log = join(dir, "bench-60s.csv");
    writeBenchLog(log, { durationS: 60, sampleRateHz: 5000, order: 2 });
    await stopBlockHelper();
    const one = await analyseSource({ source: log, ingest: {}, analysis: {} });
    startBlockHelper();
    const before = blockHelperJobs();
    const two = await analyseSource({ source: log, ingest: {}, analysis: {} });
    // Four jobs: the gearbox low-pass, the crank angle, the later blocks, then the transients
    // (the log's start holds fast spans).
    expect(blockHelperJobs()).toBe(before + 4);
    expect(two.ok && two.value.result.transient?.spans.length).toBeGreaterThan(0);
    expect(two.ok && JSON.stringify(two.value.result)).toBe(
      one.ok && JSON.stringify(one.value.result),
    );
  });
});
