import { describe, expect, it } from "vitest";
import { compareIsolation, type IsolationCurve } from "./comparison";

// Constructed curves whose band means are known by construction (flat levels per range), so the
// expected table and sentence follow from the rules in comparison.ts, not from running it.
function curve(
  name: string,
  level: (rpm: number) => number,
  from = 800,
  to = 4500,
): IsolationCurve {
  const rpm: number[] = [];
  for (let r = from; r <= to; r += 50) rpm.push(r);
  return { logId: name.length, name, rpm, dB: rpm.map(level) };
}

describe("comparison of isolation curves", () => {
  const a = curve("variant A", () => 10);
  const b = curve("variant B", (r) => (r >= 1000 && r < 2500 ? 14.1 : r >= 3500 ? 9.4 : 10.2));

  it("tabulates the mean isolation per 250 rpm band and the change against the reference", () => {
    const c = compareIsolation([a, b]);
    expect(c.bandRpm).toBe(250);
    const band = c.rows.find((r) => r.fromRpm === 1500)!;
    expect(band.toRpm).toBe(1750);
    expect(band.dB).toEqual([10, 14.1]);
    expect(band.changeDb).toEqual([null, 4.1]);
    expect(band.best).toBe(1);
    // 750–1000: only the 800…950 rpm bins, both at ~10 dB → within 0.5 dB → no better one.
    const low = c.rows.find((r) => r.fromRpm === 750)!;
    expect(low.changeDb[1]).toBeCloseTo(0.2, 6);
    expect(low.best).toBeNull();
    const high = c.rows.find((r) => r.fromRpm === 4000)!;
    expect(high.changeDb[1]).toBeCloseTo(-0.6, 6);
    expect(high.best).toBe(0);
  });

  it("says in one sentence where the new variant gains and loses", () => {
    const c = compareIsolation([a, b]);
    expect(c.verdicts).toEqual([
      "Variant B isolates 4.1 dB more between 1000 and 2500 rpm, 0.6 dB less above 3500 rpm than variant A.",
    ]);
  });

  it("compares only where both logs have data", () => {
    const short = curve("variant C", () => 12, 2000, 3000);
    const c = compareIsolation([a, short]);
    const compared = c.rows.filter((r) => r.changeDb[1] !== null);
    expect(compared[0]!.fromRpm).toBe(2000);
    expect(compared.at(-1)!.toRpm).toBe(3250);
    expect(c.rows.find((r) => r.fromRpm === 1000)!.dB).toEqual([10, null]);
    expect(c.verdicts[0]).toBe(
      "Variant C isolates 2.0 dB more between 2000 and 3250 rpm than variant A.",
    );
  });

  it("reports equal curves as equal, and disjoint ones as not comparable", () => {
    expect(compareIsolation([a, curve("variant A2", () => 10.3)]).verdicts[0]).toBe(
      "Variant A2 and variant A isolate within 0.5 dB of each other between 750 and 4750 rpm.",
    );
    expect(
      compareIsolation([curve("x", () => 5, 800, 900), curve("y", () => 5, 3000, 3100)])
        .verdicts[0],
    ).toMatch(/share no engine-speed range/);
  });

  it("compares every further drive log with the first", () => {
    const c = compareIsolation([a, b, curve("variant C", () => 8)]);
    expect(c.verdicts).toHaveLength(2);
    expect(c.verdicts[1]).toBe(
      "Variant C isolates 2.0 dB less between 750 and 4750 rpm than variant A.",
    );
    expect(c.rows.find((r) => r.fromRpm === 1500)!.best).toBe(1);
  });
});
