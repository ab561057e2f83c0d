import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { resultCsv } from "~/lib/domain/result-csv";
import type { AnalysisResult } from "~/lib/signal";

// The result CSV is read back with papaparse (an independent CSV parser from npm, RFC 4180
// quoting) and must hold exactly the result JSON's numbers, bin by bin.
const result = {
  firingOrder: 2,
  isolation: [
    { rpm: 1000, dB: 12.4, blocks: 3, aboveNoise: true },
    { rpm: 1050, dB: 13.25, blocks: 2, aboveNoise: false },
  ],
  orderCurves: [
    { order: 1, points: [{ rpm: 950, crankRpm: 1.5, gearboxRpm: 1.25, blocks: 1 }] },
    {
      order: 2,
      points: [
        { rpm: 1000, crankRpm: 32.1, gearboxRpm: 7.7, blocks: 3 },
        { rpm: 1050, crankRpm: 30.003, gearboxRpm: 6.541, blocks: 2 },
      ],
    },
  ],
} as unknown as AnalysisResult;

describe("result CSV", () => {
  it("has one row per engine-speed bin with isolation and every order's amplitudes, blank where a curve has no bin", () => {
    const { data, errors } = Papa.parse<Record<string, string>>(resultCsv(result), {
      header: true,
      skipEmptyLines: true,
    });
    expect(errors).toEqual([]);
    expect(data.map((r) => Number(r.engine_speed_rpm))).toEqual([950, 1000, 1050]);
    expect(data.map((r) => r.isolation_order_2_dB)).toEqual(["", "12.4", "13.25"]);
    expect(data.map((r) => r.isolation_above_noise)).toEqual(["", "yes", "no"]);
    expect(data.map((r) => r.crank_order_1_amplitude_rpm)).toEqual(["1.5", "", ""]);
    expect(data.map((r) => r.gearbox_order_2_amplitude_rpm)).toEqual(["", "7.7", "6.541"]);
    expect(data[2]!.crank_order_2_amplitude_rpm).toBe("30.003");
  });
});
