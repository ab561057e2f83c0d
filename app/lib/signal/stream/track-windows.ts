/**
 * Order tracking of one stretch (a section, or the whole log) in windows, for the
 * bounded-memory analysis (analyse-samples.ts): the blocks are the batch run's (trackBlocks over
 * the stretch, order-tracking.ts), placed at the same angles b·hop from the stretch's first
 * sample. A window is read with the low-pass margin (filtered-window.ts) and 2 samples more for
 * the cubic interpolation; trackBlocks computes every block whose samples [ia − 1, ie + 2] lie in
 * the window's valid middle, and the next window starts at the first block that did not fit. A
 * block longer than the window widens it (only blocks fast enough for the angle grid are ever
 * that long: slower ones are dropped as soon as the speed seen so far rules them out).
 * docs/signal-computation.md, "Bounded-memory analysis".
 */
import { indexAtAngle, samplesPerRevFor } from "../angle-grid.ts";
import type { AnalysisSetup } from "../analysis-assembly.ts";
import { noiseFloorOf } from "../isolation.ts";
import { blocksPerMapRow, mapColumns, orderBin, OrderMapRows } from "../order-curves.ts";
import { blocksIn, trackBlocks, type TrackedBlocks } from "../order-tracking.ts";
import { filterMargin, filterWindow } from "./filtered-window.ts";
import type { StretchReader } from "./section-reader.ts";

/**
 * The blocks of all stretches in one TrackedBlocks, as mergeTracked joins them
 * (section-analysis.ts), in memory that grows by about 100 bytes per block: of each block's
 * spectra only the bins the order curves, the isolation and the rattle check read are kept
 * (`columns`); the order map's rows (OrderMapRows) and the gearbox noise floor (noiseFloorOf)
 * are taken as the blocks come, with the same arithmetic as the in-memory analysis.
 */
export class BlockStore {
  readonly out: TrackedBlocks;
  private lo = Infinity;
  private hi = 0;
  private readonly columns: number[];
  private readonly map: OrderMapRows;
  private readonly floor: (gearbox: Float64Array, at: number) => number;
  /** `capacity`: the block positions of all stretches (kept or dropped, blocksIn). */
  constructor(setup: AnalysisSetup, capacity: number) {
    const bins = setup.trackArgs.topBin + 1;
    const R = setup.trackArgs.revsPerBlock;
    const { orders, firingOrder, topOrder } = setup.o;
    this.columns = [...new Set([...orders, firingOrder].map((q) => orderBin(q, R)))]
      .filter((k) => k < bins)
      .sort((a, b) => a - b);
    const columns = new Int32Array(bins).fill(-1);
    this.columns.forEach((k, i) => (columns[k] = i));
    const width = this.columns.length;
    this.map = new OrderMapRows(1 / R, mapColumns(bins, R, topOrder), blocksPerMapRow(capacity));
    this.floor = noiseFloorOf(bins, R);
    this.out = {
      revsPerBlock: R,
      orderStep: 1 / R,
      binsPerBlock: bins,
      blockCount: 0,
      blockRadS: new Float64Array(capacity),
      blockStartS: new Float64Array(capacity),
      blockEndS: new Float64Array(capacity),
      crankAmp: new Float64Array(capacity * width),
      gearboxAmp: new Float64Array(capacity * width),
      columns,
      columnsPerBlock: width,
      noiseFloor: new Float64Array(capacity),
      ...(setup.trackArgs.firingBin !== undefined ? { twistRadS: new Float64Array(capacity) } : {}),
      droppedSlowBlocks: 0,
      samplesPerRevRange: [0, 0],
    };
  }

  add(p: TrackedBlocks): void {
    const o = this.out;
    const at = o.blockCount;
    const bins = p.binsPerBlock;
    const width = this.columns.length;
    o.blockRadS.set(p.blockRadS, at);
    o.blockStartS.set(p.blockStartS, at);
    o.blockEndS.set(p.blockEndS, at);
    for (let b = 0; b < p.blockCount; b++) {
      this.columns.forEach((k, i) => {
        o.crankAmp[(at + b) * width + i] = p.crankAmp[b * bins + k]!;
        o.gearboxAmp[(at + b) * width + i] = p.gearboxAmp[b * bins + k]!;
      });
      o.noiseFloor![at + b] = this.floor(p.gearboxAmp, b * bins);
      this.map.add(
        p.blockRadS[b]!,
        p.blockStartS[b]!,
        p.blockEndS[b]!,
        p.crankAmp,
        p.gearboxAmp,
        b * bins,
      );
    }
    if (o.twistRadS && p.twistRadS) o.twistRadS.set(p.twistRadS, at);
    o.droppedSlowBlocks += p.droppedSlowBlocks;
    if (p.blockCount > 0) {
      this.lo = Math.min(this.lo, p.samplesPerRevRange[0]);
      this.hi = Math.max(this.hi, p.samplesPerRevRange[1]);
    }
    o.blockCount += p.blockCount;
  }

  /** The joined blocks (views on the stored arrays, trimmed to the blocks kept). */
  finish(): TrackedBlocks {
    const o = this.out;
    const k = o.blockCount;
    const width = this.columns.length;
    return {
      ...o,
      blockRadS: o.blockRadS.subarray(0, k),
      blockStartS: o.blockStartS.subarray(0, k),
      blockEndS: o.blockEndS.subarray(0, k),
      crankAmp: o.crankAmp.subarray(0, k * width),
      gearboxAmp: o.gearboxAmp.subarray(0, k * width),
      noiseFloor: o.noiseFloor!.subarray(0, k),
      orderMap: this.map.finish(),
      ...(o.twistRadS ? { twistRadS: o.twistRadS.subarray(0, k) } : {}),
      samplesPerRevRange: k > 0 ? [this.lo, this.hi] : [0, 0],
    };
  }
}

/** Tracks the stretch behind `reader` into `store`, `windowSamples` at a time (method at the top). */
export function trackStretch(
  reader: StretchReader,
  setup: AnalysisSetup,
  store: BlockStore,
  windowSamples: number,
  onProgress?: (fraction: number) => void,
): void {
  const { trackArgs, filters } = setup;
  const R = trackArgs.revsPerBlock;
  const hopRad = R * (1 - trackArgs.overlap) * 2 * Math.PI;
  const n = reader.length;
  const total = blocksIn(reader.totalAngle, R, trackArgs.overlap);
  const margin = filterMargin(filters) + 2;
  let next = 0;
  let coreStart = 0;
  let width = windowSamples;
  while (next < total) {
    const coreEnd = Math.min(n, coreStart + width);
    const w = reader.window(coreStart - margin, coreEnd + margin);
    const len = w.timeS.length;
    const atStart = w.start === 0;
    const atEnd = w.start + len === n;
    const c0 = coreStart - w.start; // valid middle [c0, c1) of the window
    const c1 = coreEnd - w.start;
    const angle = w.angleRad;
    const crank = filterWindow(w.crankRadS, filters);
    // Blocks next … b − 1 fit wholly in the valid middle (or reach the stretch's own ends).
    let b = next;
    let ia = 0;
    for (; b < total; b++) {
      const thetaA = b * hopRad;
      ia = indexAtAngle(angle, thetaA, ia);
      const ie = indexAtAngle(angle, thetaA + 2 * Math.PI * R, ia);
      const fitsStart = atStart || (ia - 1 >= c0 && angle[ia]! <= thetaA);
      const fitsEnd = (atEnd && coreEnd === n) || ie + 2 < c1;
      if (!fitsStart || !fitsEnd) break;
    }
    if (b > next) {
      store.add(
        trackBlocks({
          timeS: w.timeS,
          angleRad: angle,
          crankRadS: crank,
          gearboxRadS: filterWindow(w.gearboxRadS, filters),
          ...trackArgs,
          blockRange: [next, b],
        }),
      );
      next = b;
      if (next < total) coreStart = Math.max(coreStart, w.start + ia - 1);
      width = windowSamples;
      onProgress?.(next / total);
      continue;
    }
    // Block `next` does not fit: start the window at it, drop it if the speed seen so far
    // already rules out every grid (as trackBlocks would), or else widen the window.
    const thetaA = next * hopRad;
    ia = indexAtAngle(angle, thetaA, 0);
    if (!(ia - 1 >= c0 && angle[ia]! <= thetaA) && !atStart) {
      coreStart = w.start + ia - 1;
      continue;
    }
    if (ia - 1 > c0) {
      coreStart = w.start + ia - 1;
      continue;
    }
    let minRadS = Infinity;
    for (let i = ia; i < c1; i++) minRadS = Math.min(minRadS, crank[i]!);
    if (samplesPerRevFor(trackArgs.grid, minRadS) === null) {
      store.out.droppedSlowBlocks++;
      next++;
      continue;
    }
    width *= 2;
  }
}
