import type uPlot from "uplot";
import { describe, expect, it } from "vitest";
import {
  isolationLayers,
  LABEL_BOX,
  placeLabels,
  targetLabel,
  type LabelBox,
} from "./isolation-layers";
import type { TargetBand } from "./types";
import type { MeasureMethod } from "~/lib/domain/chart-data";

// A stand-in for uPlot with a 2D context that records every call, in order, so the test sees what
// is painted over what (a canvas paints later calls over earlier ones: HTML Living Standard,
// "The canvas element", drawing model).
type Op = { op: string; args: unknown[]; fillStyle?: unknown };

function fakePlot() {
  const ops: Op[] = [];
  const state: Record<string, unknown> = {};
  const ctx = new Proxy(state, {
    get(target, prop: string) {
      if (prop === "canvas") return { width: 600, clientWidth: 600 };
      if (prop === "measureText") return (text: string) => ({ width: text.length * 6 }); // 6 px a character
      if (prop in target) return target[prop];
      return (...args: unknown[]) => ops.push({ op: prop, args, fillStyle: target.fillStyle });
    },
    set(target, prop: string, value) {
      target[prop] = value;
      return true;
    },
  });
  // x: 1000–4000 rpm over 600 px; y: 0–40 dB over 300 px (top = 40 dB).
  const scales = { x: { min: 1000, max: 4000 }, y: { min: 0, max: 40 } };
  const u = {
    ctx,
    bbox: { left: 0, top: 0, width: 600, height: 300 },
    scales,
    valToPos: (v: number, scale: "x" | "y") =>
      scale === "x" ? ((v - 1000) / 3000) * 600 : 300 - (v / 40) * 300,
  } as unknown as uPlot;
  return { u, ops };
}

describe("the isolation curve's target labels", () => {
  it("are painted after every point, on a box that covers their text", () => {
    const { u, ops } = fakePlot();
    // Points below the 20 dB target right under its label's place (1100–1400 rpm, 18–19 dB).
    const iso = {
      rpm: [1100, 1200, 1300, 1400],
      dB: [18, 19, 18.5, 19],
      aboveNoise: [true, true, false, true],
      modelDb: null,
      method: ["filter", "blocks", "blocks", "blocks"] as MeasureMethod[],
    };
    const band: TargetBand = {
      id: 1,
      name: "Kestrel cruise",
      rpmFrom: 1000,
      rpmTo: 3000,
      minDb: 20,
    };
    for (const layer of isolationLayers(iso, [band], { rpm: 1300, isolationDb: 18.5 }, []))
      layer(u);

    const label = ops.findIndex((o) => o.op === "fillText" && o.args[0] === targetLabel(band));
    expect(label, "the label is drawn").toBeGreaterThanOrEqual(0);
    const lastPoint = ops.findLastIndex((o) => o.op === "arc");
    expect(lastPoint, "points are drawn").toBeGreaterThanOrEqual(0);
    expect(label, "label after the last point").toBeGreaterThan(lastPoint);
    // The one point measured by the order filter gets its square, also under the label.
    const squares = ops.flatMap((o, i) => (o.op === "strokeRect" ? [i] : []));
    expect(squares.length, "one filter square").toBe(1);
    expect(label, "label after the filter square").toBeGreaterThan(squares[0]!);

    // The box right before the text, in the label colour's backdrop, covers the text's extent.
    const box = ops.slice(0, label).findLast((o) => o.op === "fillRect")!;
    expect(box.fillStyle).toBe(LABEL_BOX);
    const [bx, by, bw, bh] = box.args as number[];
    const [, tx, ty] = ops[label]!.args as [string, number, number];
    const tw = targetLabel(band).length * 6;
    expect(bx).toBeLessThanOrEqual(tx);
    expect(bx! + bw!).toBeGreaterThanOrEqual(tx + tw);
    expect(ty).toBeGreaterThan(by!);
    expect(ty).toBeLessThan(by! + bh!);
    // The points lie under the line at the label's left edge, so it goes above: it hides none.
    for (let i = 0; i < iso.rpm.length; i++) {
      const x = u.valToPos(iso.rpm[i]!, "x");
      const y = u.valToPos(iso.dB[i]!, "y");
      expect(x > bx! && x < bx! + bw! && y > by! && y < by! + bh!, `point ${i}`).toBe(false);
    }
  });

  it("never overlap each other", () => {
    // Two targets starting at the same speed with nearly the same minimum: the second label moves.
    const boxes = placeLabels(
      [
        { x0: 100, x1: 260, top: 50, w: 120 },
        { x0: 110, x1: 250, top: 55, w: 120 },
        { x0: 400, x1: 560, top: 50, w: 80 },
      ],
      PLOT,
      [],
      15,
      3,
    );
    for (let i = 0; i < boxes.length; i++)
      for (let j = i + 1; j < boxes.length; j++)
        expect(overlap(boxes[i]!, boxes[j]!), `${i} and ${j}`).toBe(false);
    // A label that collides with nothing sits just under its own line.
    expect(boxes[2]!.y).toBe(53);
    // A label that would run off the right edge is moved left inside the plot.
    const [edge] = placeLabels([{ x0: 560, x1: 600, top: 50, w: 100 }], PLOT, [], 15, 3);
    expect(edge!.x + edge!.w).toBeLessThanOrEqual(600);
  });

  it("go where they cover no data point: under the line, above it, then further off", () => {
    const label = { x0: 100, x1: 500, top: 150, w: 100 };
    // Free plot: under the line from the range's left edge.
    expect(placeLabels([label], PLOT, [], 15, 3)[0]).toMatchObject({ x: 103, y: 153 });
    // A point under the line there: still under the line, further along the range, clear of it.
    const [along] = placeLabels([label], PLOT, [{ x: 130, y: 160 }], 15, 3);
    expect(along!.y).toBe(153);
    expect(along!.x).toBeGreaterThan(134);
    // Points under the line all along the range (a curve below the target): above the line.
    const under = Array.from({ length: 50 }, (_, i) => ({ x: 100 + 8 * i, y: 160 }));
    expect(placeLabels([label], PLOT, under, 15, 3)[0]).toMatchObject({ x: 103, y: 132 });
    // A curve crossing the line all along the range: a line further off, still covering none.
    const crossing = Array.from({ length: 50 }, (_, i) => ({
      x: 100 + 8 * i,
      y: 150 + (i % 2 ? 6 : -6),
    }));
    const [off] = placeLabels([label], PLOT, crossing, 15, 3);
    expect(Math.abs(off!.y - 150)).toBeGreaterThan(15);
    for (const p of crossing)
      expect(p.x > off!.x && p.x < off!.x + off!.w && p.y > off!.y && p.y < off!.y + 15).toBe(
        false,
      );
  });
});

const PLOT = { left: 0, right: 600, top: 0, bottom: 300 };
const overlap = (a: LabelBox, b: LabelBox) =>
  a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
