/**
 * The report's building blocks: the WOFF unpacking checked against fontkit's own WOFF reader (an
 * independent implementation, npm), the glyph fallback, the axis ticks (the 1-2-5 rule of round
 * chart ticks, common practice) and the margin's sign.
 */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { coveredText, textRuns, woffToSfnt } from "./report-fonts";
import { niceRange, niceTicks } from "./report-charts";
import { marginText } from "./report-text";

const require = createRequire(import.meta.url);
const fontkit = createRequire(require.resolve("pdfkit"))("fontkit") as {
  create(b: Buffer): {
    numGlyphs: number;
    postscriptName: string;
    characterSet: number[];
    glyphForCodePoint(cp: number): { id: number; advanceWidth: number };
  };
};

describe("woffToSfnt (W3C WOFF 1.0) against fontkit's WOFF reader", () => {
  it("gives a TrueType font with the same glyphs, names and advance widths", () => {
    for (const name of ["inter-latin-400-normal", "inter-latin-ext-600-normal"]) {
      const woff = readFileSync(require.resolve(`@fontsource/inter/files/${name}.woff`));
      const sfnt = woffToSfnt(woff);
      expect(sfnt.toString("latin1", 0, 4)).not.toBe("wOFF");
      const a = fontkit.create(woff);
      const b = fontkit.create(sfnt);
      expect(b.numGlyphs).toBe(a.numGlyphs);
      expect(b.postscriptName).toBe(a.postscriptName);
      expect(b.characterSet).toEqual(a.characterSet);
      for (const cp of [0x41, 0x67, 0x2212, 0xb2, 0x141])
        if (a.characterSet.includes(cp))
          expect(b.glyphForCodePoint(cp).advanceWidth).toBe(a.glyphForCodePoint(cp).advanceWidth);
    }
  });

  it("refuses what is not a WOFF file", () => {
    expect(() => woffToSfnt(Buffer.from("not a font at all, not at all"))).toThrow(/WOFF/);
  });
});

describe("textRuns: every character from a subset that has it", () => {
  it("keeps the latin subset for plain text, minus signs, ², ° and en dashes", () => {
    expect(textRuns("−4.1 dB, 500 rad/s², 30.0°, 900–1400 rpm", "regular")).toEqual([
      { font: "Inter", text: "−4.1 dB, 500 rad/s², 30.0°, 900–1400 rpm" },
    ]);
  });
  it("draws Polish letters from latin-ext, spells ≥ and →, and marks what no subset has", () => {
    expect(textRuns("Łódź", "bold")).toEqual([
      { font: "Inter-Semibold-ext", text: "Ł" },
      { font: "Inter-Semibold", text: "ód" },
      { font: "Inter-Semibold-ext", text: "ź" },
    ]);
    expect(coveredText("at ≥ 3 dB → ok")).toBe("at >= 3 dB -> ok");
    expect(coveredText("漢字")).toBe("??");
  });
});

describe("axis ticks", () => {
  it("are round steps of 1, 2, 2.5 or 5 × 10^k inside the range", () => {
    expect(niceTicks(0, 3000, 6)).toEqual([0, 500, 1000, 1500, 2000, 2500, 3000]);
    expect(niceTicks(-10, 30, 5)).toEqual([-10, 0, 10, 20, 30]);
    expect(niceTicks(0, 0.9, 5)).toEqual([0, 0.2, 0.4, 0.6, 0.8]);
  });
  it("a range holds its data and starts at zero when asked", () => {
    const r = niceRange([812, 2990], { pad: 0.03 });
    expect(r.min).toBeLessThanOrEqual(812);
    expect(r.max).toBeGreaterThanOrEqual(2990);
    expect(niceRange([3.2, 11.8], { zero: true }).min).toBe(0);
  });
});

describe("margins", () => {
  it("carry a plus when better than the target, a true minus when worse, none at zero", () => {
    expect(marginText(0.94, "dB")).toBe("+0.9 dB");
    expect(marginText(-4.06, "dB")).toBe("−4.1 dB");
    expect(marginText(0.04, "dB")).toBe("0.0 dB");
    expect(marginText(442, "rad/s²")).toBe("+442 rad/s²");
    expect(marginText(16.7, "°")).toBe("+16.7°");
    expect(marginText(null, "dB")).toBe("—");
  });
});
