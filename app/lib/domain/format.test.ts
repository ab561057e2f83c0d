import { describe, expect, it } from "vitest";
import {
  amplitudeText,
  dampingRatioText,
  dbChangeText,
  dbRangeText,
  dbText,
  frequencyText,
  isolationRangeText,
  orderNumber,
  percentText,
  radS2Text,
  rpmRangeText,
  rpmText,
  sampleRateText,
  secondsText,
} from "./format";

// Expected strings are worked out by hand from each rule: the decimal as written is rounded half
// away from zero (ISO 80000-1:2009 Annex B, rule B; ECMA-402's default "halfExpand"), and a
// negative number carries U+2212 MINUS SIGN (the Unicode Standard's minus for numbers). Note
// 19.45 → 19.5 and 1.005 → 1.01 although their binary values lie just below the tie.

describe("one rounding rule per quantity", () => {
  it("writes dB with one decimal", () => {
    const cases: [number, string][] = [
      [19.48, "19.5"],
      [38.81, "38.8"],
      [19.45, "19.5"],
      [38.75, "38.8"],
      [-3.25, "\u22123.3"],
      [-12.04, "\u221212.0"],
      [7, "7.0"],
      // A tiny negative rounds to zero and loses its sign (no "−0.0" on screen).
      [-0.04, "0.0"],
    ];
    for (const [x, want] of cases) expect(dbText(x), String(x)).toBe(`${want} dB`);
  });

  it("writes engine speed as a whole number of rpm", () => {
    const cases: [number, string][] = [
      [1249.5, "1250"],
      [1250.49, "1250"],
      [3999.999, "4000"],
      [812.3, "812"],
    ];
    for (const [x, want] of cases) expect(rpmText(x), String(x)).toBe(`${want} rpm`);
  });

  it("writes amplitudes to 3 significant digits, whole numbers from 100 up", () => {
    const cases: [number, string][] = [
      [4.2749, "4.27"],
      [0.12345, "0.123"],
      [87.64, "87.6"],
      [9.995, "10"],
      [1.005, "1.01"],
    ];
    for (const [x, want] of cases) expect(amplitudeText(x, "rpm"), String(x)).toBe(`${want} rpm`);
    // From 100 up: whole, never rounded to tens (1234, not 1230).
    expect(amplitudeText(1234.4, "rpm")).toBe("1234 rpm");
    expect(amplitudeText(412.6, "rad/s")).toBe("413 rad/s");
  });

  it("writes angular acceleration as a whole number of rad/s², in any amplitude text too", () => {
    expect(radS2Text(412.5)).toBe("413 rad/s²");
    expect(radS2Text(87.64)).toBe("88 rad/s²");
    expect(radS2Text(-50.2)).toBe("\u221250 rad/s²");
    expect(amplitudeText(87.64, "rad/s²")).toBe("88 rad/s²");
  });

  it("states an isolation range over the points above the noise floor", () => {
    // The lower bounds (false) are left out while any point is above the noise floor.
    expect(isolationRangeText([12.04, 19.48, 38.81, 41], [false, true, true, false])).toBe(
      "19.5 to 38.8 dB",
    );
    expect(isolationRangeText([12.04, 41], [false, false])).toBe("12.0 to 41.0 dB");
    expect(isolationRangeText([], [])).toBeNull();
  });

  it("writes times with 1 decimal, frequencies, ratios, orders and shares by their rules", () => {
    expect(secondsText(12.345678)).toBe("12.3 s");
    expect(secondsText(12.25)).toBe("12.3 s");
    expect(secondsText(30)).toBe("30.0 s");
    expect(frequencyText(14.2349)).toBe("14.23 Hz");
    expect(sampleRateText(999.6)).toBe("1000 Hz");
    expect(dampingRatioText(0.11849)).toBe("0.118");
    expect(orderNumber(2)).toBe("2");
    expect(orderNumber(1.5)).toBe("1.5");
    expect(orderNumber(0.25)).toBe("0.25");
    expect(orderNumber(10)).toBe("10");
    expect(percentText(0.425)).toBe("43 %");
  });

  it("writes a change with its sign and a range as one string", () => {
    expect(dbChangeText(2.34)).toBe("+2.3 dB");
    expect(dbChangeText(-1.46)).toBe("\u22121.5 dB");
    expect(dbChangeText(0.04)).toBe("±0.0 dB");
    expect(dbRangeText(19.48, 38.81)).toBe("19.5 to 38.8 dB");
    expect(dbRangeText(19.48, 19.51)).toBe("19.5 dB");
    expect(rpmRangeText(900.2, 3999.7)).toBe("900–4000 rpm");
  });

  it("writes a dash for a missing value", () => {
    expect(dbText(null)).toBe("— dB");
    expect(rpmText(Number.NaN)).toBe("— rpm");
  });
});
