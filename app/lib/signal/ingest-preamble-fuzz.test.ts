import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ingestCsv } from "./ingest.ts";

// Property test (fast-check, bounded runs): any preamble of the documented forms (key/value with
// `;` `,` `:` `=` or tab, comments with `#` `//` `%`, blank lines), of 0–120 lines, before a
// header, an optional units row and an analytic ramp (time i/1000 s, crank 900 + i/10 rpm) in
// any delimiter and decimal style: the ingest finds the header on its file line, reads every
// row, keeps one metadata entry per non-blank preamble line, and reads the first value right.
const key = fc.stringMatching(/^[A-Za-z][A-Za-z ]{0,12}[A-Za-z]$/);
const value = fc.stringMatching(/^[A-Za-z0-9][A-Za-z0-9 ./-]{0,15}$/);
const line = fc.oneof(
  fc.tuple(key, fc.constantFrom(";", ",", ": ", " = ", "\t"), value).map(([k, s, v]) => ({
    text: `${k}${s}${v}`,
    entry: { key: k, value: v.trim() },
  })),
  fc.tuple(fc.constantFrom("# ", "// ", "%"), key, value).map(([m, k, v]) => ({
    text: `${m}${k}: ${v}`,
    entry: { key: k, value: v.trim() },
  })),
  fc.constant({ text: "", entry: undefined }),
);

describe("a preamble of any documented form", () => {
  it("is kept as metadata; the header is found and row numbers stay file lines", () => {
    fc.assert(
      fc.property(
        fc.array(line, { maxLength: 120 }),
        fc.constantFrom([",", "."], [";", "."], [";", ","], ["\t", "."], ["\t", ","]),
        fc.boolean(),
        (pre, [d, dec], unitsRow) => {
          const lines = pre.map((p) => p.text);
          lines.push(["t", "crank", "gearbox"].join(d));
          if (unitsRow) lines.push(["[s]", "[1/min]", "[1/min]"].join(d));
          for (let i = 0; i < 2500; i++) {
            const cells = [(i / 1000).toFixed(3), (900 + i / 10).toFixed(1), "880"];
            lines.push(cells.map((c) => c.replace(".", dec)).join(d));
          }
          // A bad cell in data row 2000: its file line is the preamble + header (+ units) + 2000.
          const bad = pre.length + 1 + (unitsRow ? 1 : 0) + 2000;
          lines[bad - 1] = lines[bad - 1]!.replace("880", "x");
          const r = ingestCsv(`${lines.join("\n")}\n`);
          expect(r.ok).toBe(false);
          if (!r.ok) expect(r.error).toMatchObject({ code: "not_numeric", row: bad });
          lines[bad - 1] = lines[bad - 1]!.replace("x", "880");
          const good = ingestCsv(`${lines.join("\n")}\n`);
          if (!good.ok) throw new Error(good.error.message);
          expect(good.value.source.rows).toBe(2500);
          expect(good.value.crankRadS[0]).toBeCloseTo((900 * 2 * Math.PI) / 60, 9);
          const want = pre.flatMap((p) => (p.entry ? [p.entry] : []));
          expect(good.value.source.metadata).toEqual(want);
        },
      ),
      { numRuns: 60, seed: 14 },
    );
  });
});
