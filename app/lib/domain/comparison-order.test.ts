import { describe, expect, it } from "vitest";
import {
  comparisonOrder,
  referenceSentence,
  suggestedPairs,
  type SuggestionCandidate,
} from "./comparison-order";

// The reference rule and the suggested pairs of issue 11 §3.2/§3.3, on hand-made drive logs whose
// expected order follows from the rule as written in comparison-order.ts (and README
// "Comparison"), not from running it. No numeric values: dates and ids only.

const day = (d: string, hour = 12) => new Date(`${d}T${String(hour).padStart(2, "0")}:00:00Z`);

function log(
  id: number,
  damperVariant: string,
  testDate: string | null,
  uploadedAt: Date,
  more: Partial<SuggestionCandidate> = {},
): SuggestionCandidate {
  return {
    id,
    damperVariant,
    testDate,
    uploadedAt,
    condition: "run-up",
    gear: 3,
    blobKey: `file-${id}`,
    analysed: true,
    ...more,
  };
}

const ids = (logs: { id: number }[]) => logs.map((l) => l.id);

describe("the reference of a comparison", () => {
  // Older A (the fitted variant) and newer B, uploaded in that order.
  const a = log(1, "A", "2026-11-04", day("2026-11-05"));
  const b = log(2, "B", "2026-11-18", day("2026-11-18"));

  it("does not depend on the order the drive logs are given in", () => {
    expect(ids(comparisonOrder([a, b], "A").ordered)).toEqual([1, 2]);
    expect(ids(comparisonOrder([b, a], "A").ordered)).toEqual([1, 2]);
  });

  it("is the only drive log with the vehicle's fitted damper variant, even when it is newer", () => {
    // The vehicle is fitted with B: B is "before", although A was tested first.
    const order = comparisonOrder([a, b], "B");
    expect(ids(order.ordered)).toEqual([2, 1]);
    expect(order.reason).toBe("fitted-damper");
  });

  it("is the earliest tested when no log, or more than one, has the fitted variant", () => {
    expect(comparisonOrder([b, a], "C")).toMatchObject({ reason: "tested-first" });
    expect(ids(comparisonOrder([b, a], "C").ordered)).toEqual([1, 2]);
    const a2 = log(3, "A", "2026-11-02", day("2026-11-20"));
    // Two logs of A: the fitted variant does not decide; 3 was tested first (2 Nov).
    expect(ids(comparisonOrder([a, b, a2], "A").ordered)).toEqual([3, 1, 2]);
  });

  it("counts a drive log without a test date by its upload day, then the upload time, then the id", () => {
    const undatedEarly = log(7, "C", null, day("2026-11-10"));
    // 10 Nov (upload day) lies between 4 Nov and 18 Nov.
    expect(ids(comparisonOrder([b, undatedEarly, a], "X").ordered)).toEqual([1, 7, 2]);
    // Same test day: the earlier upload first, whatever the ids.
    const sameDayLater = log(4, "D", "2026-11-04", day("2026-11-06"));
    expect(ids(comparisonOrder([sameDayLater, a], "X").ordered)).toEqual([1, 4]);
    // Same day and upload time: the lower id.
    const twin = log(0, "E", "2026-11-04", day("2026-11-05"));
    expect(ids(comparisonOrder([a, twin], "X").ordered)).toEqual([0, 1]);
  });

  it("says why in one sentence", () => {
    expect(referenceSentence({ ...a, name: "variant A" }, "fitted-damper", "A")).toBe(
      "Reference: variant A, the only drive log here with the vehicle's fitted damper variant (A).",
    );
    expect(referenceSentence({ ...a, name: "variant A" }, "tested-first", "C")).toBe(
      "Reference: variant A, the one tested first (test date 2026-11-04).",
    );
    expect(
      referenceSentence({ ...a, name: "the drive log of 2026-11-04" }, "tested-first", "C"),
    ).toBe("Reference: the drive log of 2026-11-04, the one tested first.");
    const undated = log(9, "A", null, day("2026-11-10"));
    expect(referenceSentence({ ...undated, name: "drive log 9" }, "tested-first", "C")).toBe(
      "Reference: drive log 9, the one tested first (no test date, uploaded 2026-11-10).",
    );
  });
});

describe("suggested pairs", () => {
  const conditions = ["idle-neutral", "run-up"];
  const a = log(1, "A", "2026-11-04", day("2026-11-05"));
  const b = log(2, "B", "2026-11-18", day("2026-11-18"));
  const pairIds = (list: ReturnType<typeof suggestedPairs>) => list.map((p) => ids(p.logs));

  it("a newer upload of the same file without a test date changes nothing", () => {
    const before = suggestedPairs([b, a], "A", conditions);
    expect(pairIds(before)).toEqual([[1, 2]]);
    const again = log(10, "B", null, day("2026-11-30"), { blobKey: b.blobKey });
    expect(pairIds(suggestedPairs([again, b, a], "A", conditions))).toEqual([[1, 2]]);
  });

  it("prefers a dated drive log of a variant to an undated one, and the latest test date", () => {
    const undatedB = log(11, "B", null, day("2026-11-30"));
    expect(pairIds(suggestedPairs([undatedB, b, a], "A", conditions))).toEqual([[1, 2]]);
    const laterB = log(12, "B", "2026-11-20", day("2026-11-21"));
    expect(pairIds(suggestedPairs([laterB, undatedB, b, a], "A", conditions))).toEqual([[1, 12]]);
  });

  it("lists every pair of variants: three variants give three pairs", () => {
    const c = log(3, "C", "2026-11-25", day("2026-11-25"));
    const pairs = suggestedPairs([c, b, a], "A", conditions);
    // C(3, 2) = 3 pairs; A is fitted, so it is the reference against B and C; B was tested before C.
    expect(pairIds(pairs)).toEqual([
      [1, 2],
      [1, 3],
      [2, 3],
    ]);
  });

  it("pairs only logs of the same condition and gear, analysed ones, in the conditions' order", () => {
    const idleA = log(20, "A", "2026-11-03", day("2026-11-03"), {
      condition: "idle-neutral",
      gear: 0,
    });
    const idleB = log(21, "B", "2026-11-17", day("2026-11-17"), {
      condition: "idle-neutral",
      gear: 0,
    });
    const gear2B = log(22, "B", "2026-11-17", day("2026-11-17"), { gear: 2 });
    const waiting = log(23, "C", "2026-11-19", day("2026-11-19"), { analysed: false });
    const pairs = suggestedPairs([waiting, gear2B, b, idleB, a, idleA], "A", conditions);
    expect(pairIds(pairs)).toEqual([
      [20, 21],
      [1, 2],
    ]);
    expect(pairs.map((p) => [p.condition, p.gear])).toEqual([
      ["idle-neutral", 0],
      ["run-up", 3],
    ]);
  });
});
