import { describe, expect, it } from "vitest";
import { metadataDetails, parseRecordingDate } from "./metadata-details.ts";

// Date forms: ISO 8601 calendar dates (YYYY-MM-DD, with or without a time), the dotted
// day-first form and English month names (common practice in recorder exports). Validity of a
// day by the Gregorian calendar: 2028 is a leap year (divisible by 4, not by 100), 2026 not.
describe("the recording date", () => {
  it.each([
    ["2026-12-02", "2026-12-02"],
    ["2026-12-02T08:15:00Z", "2026-12-02"],
    ["2026-12-02 08:15", "2026-12-02"],
    ["2026/12/02", "2026-12-02"],
    ["02.12.2026", "2026-12-02"],
    ["2.12.2026 08:15:00", "2026-12-02"],
    ["2 Dec 2026", "2026-12-02"],
    ["December 2, 2026", "2026-12-02"],
    ["25/12/2026", "2026-12-25"], // day over 12: day-first
    ["12/25/2026", "2026-12-25"], // …or month-first
    ["29.02.2028", "2028-02-29"],
  ])("%s → %s", (text, want) => {
    expect(parseRecordingDate(text)).toBe(want);
  });
  it.each(["03/04/2026", "29.02.2026", "2026-13-01", "31.04.2026", "yesterday", "12:30:05", ""])(
    "%s is not read (ambiguous or not a date)",
    (text) => {
      expect(parseRecordingDate(text)).toBeUndefined();
    },
  );
});

describe("metadataDetails", () => {
  it("takes the date from date-like keys and the comment from comment-like keys", () => {
    expect(
      metadataDetails([
        { key: "Recorder", value: "Kestrel DL-8" },
        { key: "Test_Date", value: "02.12.2026" },
        { key: "Description", value: "K7 warm idle, 3rd gear pull" },
        { key: "Rate", value: "5 kHz" },
      ]),
    ).toEqual({ date: "2026-12-02", comment: "K7 warm idle, 3rd gear pull" });
  });
  it.each([
    ["date", "2026-11-30"],
    ["Recorded", "2026/11/30"],
    ["Start time", "2026-11-30T07:00:00"],
    ["Recording date", "30 Nov 2026"],
  ])("reads the key %s", (key, value) => {
    expect(metadataDetails([{ key, value }]).date).toBe("2026-11-30");
  });
  it("keeps the first readable date; joins several comments in order", () => {
    expect(
      metadataDetails([
        { key: "Date", value: "unknown" },
        { key: "Note", value: "first" },
        { key: "Start", value: "2026-01-05" },
        { key: "Date", value: "2026-02-06" },
        { key: "comment", value: "second" },
      ]),
    ).toEqual({ date: "2026-01-05", comment: "first\nsecond" });
  });
  it("offers nothing when the metadata hold neither", () => {
    expect(metadataDetails([])).toEqual({});
    expect(metadataDetails([{ key: "Rate", value: "2000 Hz" }])).toEqual({});
  });
});
