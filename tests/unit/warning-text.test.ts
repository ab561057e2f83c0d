import { describe, expect, it } from "vitest";
import { countText, plural } from "~/lib/base/plural";
import { warningText } from "~/lib/domain/warning-text";

describe("countText", () => {
  // CLDR plural rules for English (unicode.org, Language Plural Rules): "one" is i = 1 and v = 0
  // (exactly 1, no visible fraction digits); everything else, 0 included, is "other".
  it("follows the CLDR rule for English", () => {
    expect(countText(1, "engine speed")).toBe("1 engine speed");
    expect(countText(0, "engine speed")).toBe("0 engine speeds");
    expect(countText(2, "drive log")).toBe("2 drive logs");
    expect(countText(1.5, "block")).toBe("1.5 blocks");
    expect(countText(1, "address", "addresses")).toBe("1 address");
    expect(countText(3, "address", "addresses")).toBe("3 addresses");
    expect(plural(1, "was", "were")).toBe("was");
    expect(plural(21, "was", "were")).toBe("were");
  });
});

describe("warningText", () => {
  // The messages as the signal core writes them (app/lib/signal/analyse.ts), including the
  // wording stored before the plural fix ("at 1 engine speeds").
  const cases = [
    {
      code: "gearbox_near_noise",
      message:
        "at 1 engine speeds the gearbox firing-order amplitude is close to the sensor noise; isolation there is a lower bound",
      has: "At 1 engine speed the gearbox-input signal",
    },
    {
      code: "gearbox_near_noise",
      message: "at 4 engine speeds the gearbox firing-order amplitude is close to the sensor noise",
      has: "At 4 engine speeds",
    },
    {
      code: "slow_blocks_dropped",
      message:
        "1 block was left out because the engine ran too slowly in them (below 7 rpm) for an alias-free angle grid",
      has: "Left out of the analysis: 1 block where the engine ran too slowly (below 7 rpm)",
    },
    {
      code: "no_resonance",
      message: "the damper isolates at every measured speed; the log does not reach its resonance",
      has: "No damper resonance found. The damper isolates at every measured speed; the log does not reach its resonance.",
    },
    {
      code: "no_model_fit",
      message: "only 1 engine-speed bin with isolation; the fit needs 6",
      has: "Only 1 engine-speed bin with isolation; the fit needs 6.",
    },
    { code: "something_new", message: "a later warning", has: "A later warning." },
  ];
  it.each(cases)("$code reads as sentences without the code", ({ code, message, has }) => {
    const text = warningText({ code, message });
    expect(text).toContain(has);
    expect(text).not.toContain(code);
    expect(text).not.toMatch(/\b[a-z]+(?:_[a-z]+)+\b/);
    expect(text).not.toMatch(/(?<![\d.])1 (?:engine speeds|blocks|bins)\b/);
    expect(text).toMatch(/^[A-Z].*\.$/s);
  });
});
