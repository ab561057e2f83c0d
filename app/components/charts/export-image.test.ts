import { describe, expect, it } from "vitest";
import {
  CAPTION_FILL,
  captionLines,
  composeExport,
  utcMinute,
  type CanvasLike,
} from "./export-image";
import type { LegendEntry } from "./legend";

// A canvas stand-in whose 2D context records what is painted (fillText, fillRect, and the
// fillStyle at the time), with a fixed 6 px per character for measureText.
function fakeCanvas() {
  const painted: { op: string; args: unknown[]; fillStyle: unknown }[] = [];
  const state: Record<string, unknown> = {};
  const ctx = new Proxy(state, {
    get(target, prop: string) {
      if (prop === "measureText") return (t: string) => ({ width: t.length * 6 });
      if (prop in target) return target[prop];
      return (...args: unknown[]) => painted.push({ op: prop, args, fillStyle: target.fillStyle });
    },
    set(target, prop: string, value) {
      target[prop] = value;
      return true;
    },
  });
  const canvas: CanvasLike = {
    width: 300,
    height: 150,
    getContext: () => ctx as unknown as CanvasRenderingContext2D,
  };
  return { canvas, painted };
}

const CONTEXT = {
  vehicle: "Kestrel D4 (KST-D4)",
  driveLog: "kestrel-runup-3rd-full-load-damper-a.csv",
  analysis: { id: 17, version: 2, createdAt: "2026-03-14T09:05:41.000Z" },
};
const EXPORTED = new Date("2026-03-15T16:30:12Z");

describe("the PNG export's caption", () => {
  it("names the chart, vehicle, drive log, analysis version and id, analysis and export dates", () => {
    const text = captionLines("Isolation curve", CONTEXT, EXPORTED).join("\n");
    for (const part of [
      "Isolation curve",
      "Kestrel D4 (KST-D4)",
      "kestrel-runup-3rd-full-load-damper-a.csv",
      "version 2",
      "id 17",
      // ISO 8601 date and time in UTC, to the minute.
      "2026-03-14 09:05 UTC",
      "2026-03-15 16:30 UTC",
    ])
      expect(text).toContain(part);
    expect(utcMinute("not a date")).toBe("not a date");
  });

  it("is painted in a strip at the bottom, below the plot and the legend, inside the image", () => {
    const { canvas, painted } = fakeCanvas();
    const source = { width: 600, height: 300 } as unknown as HTMLCanvasElement;
    const legend: LegendEntry[] = [{ kind: "line", label: "Isolation", colour: "#000" }];
    const caption = captionLines("Isolation curve", CONTEXT, EXPORTED);
    const out = composeExport(() => canvas, source, 1, "Isolation curve", legend, caption);

    // Taller than title (30) + plot (300) + legend row (18 + 8) + padding (12) by the strip.
    const withoutCaption = 30 + 300 + 26 + 12;
    expect(out.height).toBeGreaterThanOrEqual(withoutCaption + caption.length * 16);
    const strip = painted.find((p) => p.op === "fillRect" && p.fillStyle === CAPTION_FILL);
    expect(strip, "the caption strip").toBeTruthy();
    const [, top, w, h] = strip!.args as number[];
    expect(top).toBeGreaterThanOrEqual(withoutCaption);
    expect(top! + h!).toBe(out.height);
    expect(w).toBe(out.width);
    for (const line of caption) {
      const drawn = painted.find((p) => p.op === "fillText" && p.args[0] === line);
      expect(drawn, line).toBeTruthy();
      const y = drawn!.args[2] as number;
      expect(y).toBeGreaterThan(top!);
      expect(y).toBeLessThan(out.height);
    }
  });
});
