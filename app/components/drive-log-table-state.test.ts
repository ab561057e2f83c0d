import { describe, expect, it } from "vitest";
import {
  filterRows,
  readState,
  tableParams,
  type DriveLogTableRow,
  type Filters,
} from "./drive-log-table-state";

// The drive-log table's filters and URL state: our own product behaviour (the vehicle page in
// docs/ui.md; issue 6 item 2). Expected rows are picked by hand from the three below.

const base: DriveLogTableRow = {
  id: 1,
  fileName: "idle.csv",
  condition: "idle-neutral",
  gear: 0,
  damperVariant: "A",
  date: "2026-03-14",
  dateIsUpload: false,
  uploadedAt: "2026-03-15T08:00:00.000Z",
  status: "done",
  progress: 1,
  stage: null,
  problem: null,
  isolation: { minDb: 9.6, maxDb: 9.6, rpmMin: 800, rpmMax: 800 },
  rattle: { verdict: "over-limit", valueRadS2: 620 },
  targets: { passed: 1, failed: 0, notCovered: 0, failedNames: [] },
};
const rows: DriveLogTableRow[] = [
  base,
  {
    ...base,
    id: 2,
    fileName: "runup.csv",
    condition: "run-up",
    gear: 3,
    damperVariant: "B",
    date: "2026-03-20",
    rattle: null,
    targets: { passed: 0, failed: 1, notCovered: 1, failedNames: ["Run-up (−2.0 dB)"] },
  },
  {
    ...base,
    id: 3,
    fileName: "new.csv",
    gear: null,
    date: "2026-03-21",
    dateIsUpload: true,
    status: "analysing",
    isolation: null,
    rattle: null,
    targets: null,
  },
];
const none: Filters = { condition: "", gear: "", variant: "", from: "", to: "", verdict: "" };
const ids = (f: Partial<Filters>) => filterRows(rows, { ...none, ...f }).map((r) => r.id);

describe("drive-log table filters (product behaviour, docs/ui.md vehicle page)", () => {
  it("condition, gear (with 'none' for logs without one) and damper variant match exactly", () => {
    expect(ids({})).toEqual([1, 2, 3]);
    expect(ids({ condition: "run-up" })).toEqual([2]);
    expect(ids({ gear: "0" })).toEqual([1]);
    expect(ids({ gear: "none" })).toEqual([3]);
    expect(ids({ variant: "B" })).toEqual([2]);
  });
  it("the date range includes both ends", () => {
    expect(ids({ from: "2026-03-14", to: "2026-03-20" })).toEqual([1, 2]);
    expect(ids({ from: "2026-03-21" })).toEqual([3]);
    expect(ids({ to: "2026-03-13" })).toEqual([]);
  });
  it("verdicts: any failure, a failed target, every target passed, rattle, not analysed", () => {
    expect(ids({ verdict: "over" })).toEqual([1, 2]);
    expect(ids({ verdict: "targets-failed" })).toEqual([2]);
    expect(ids({ verdict: "targets-passed" })).toEqual([1]);
    expect(ids({ verdict: "rattle-over" })).toEqual([1]);
    expect(ids({ verdict: "rattle-ok" })).toEqual([]);
    expect(ids({ verdict: "not-analysed" })).toEqual([3]);
  });
});

describe("drive-log table state in the URL", () => {
  it("reads a bookmarked view; a no-JS sort button's value (the last one) wins", () => {
    const params = tableParams(
      new URLSearchParams("sort=date.desc&variant=A&condition=&sort=gear.asc&page=2&uploaded=5"),
    );
    expect(params).toEqual({ sort: "gear.asc", variant: "A", page: "2" });
    expect(readState(params)).toEqual({
      filters: { ...none, variant: "A" },
      sorting: [{ id: "gear", desc: false }],
      page: 2,
    });
  });
  it("falls back to newest first, page 1, and drops dates that are not YYYY-MM-DD", () => {
    expect(readState({ sort: "nonsense.asc", page: "-3", from: "14/03/2026" })).toEqual({
      filters: none,
      sorting: [{ id: "date", desc: true }],
      page: 1,
    });
  });
});
