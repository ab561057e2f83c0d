import fc from "fast-check";
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { createIngester, ingestCsv } from "./ingest.ts";

// Property tests (fast-check, bounded runs). The reference for field splitting is papaparse
// and for number reading JavaScript's Number() (ECMA-262 StringToNumber, correctly rounded).
const HEADER = "time [s],crank speed [rpm],gearbox input speed [rpm],x1,x2";
function valid(n: number): string {
  const lines = [HEADER];
  for (let i = 0; i < n; i++)
    lines.push(
      `${(i / 1000).toFixed(3)},${(800 + 5 * Math.sin(i)).toFixed(3)},${(790 + 2 * Math.cos(i)).toFixed(3)},${i},${-i / 8}`,
    );
  return `${lines.join("\n")}\n`;
}
const VALID = valid(400);
const VALID_BYTES = new TextEncoder().encode(VALID);

function isOutcome(r: unknown): boolean {
  const o = r as { ok: boolean; error?: { code: unknown; message: unknown }; warnings: unknown };
  if (!Array.isArray(o.warnings)) return false;
  return (
    o.ok === true ||
    (typeof o.error?.code === "string" &&
      typeof o.error.message === "string" &&
      o.error.message.length > 0)
  );
}

describe("ingest never throws", () => {
  it("on random bytes", () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 3000 }), (bytes) => isOutcome(ingestCsv(bytes))),
      { numRuns: 300 },
    );
  });
  it("on random text made of CSV-ish characters", () => {
    const ch = fc.constantFrom(...'0123456789.,;\t\n\r -+eE"abc[]()'.split(""));
    fc.assert(
      fc.property(
        fc.array(ch, { maxLength: 400 }).map((a) => `${HEADER}\n${a.join("")}`),
        (t) => isOutcome(ingestCsv(t)),
      ),
      { numRuns: 300 },
    );
  });
  it("on random truncations of a valid file, which read as a prefix of the whole", () => {
    const whole = ingestCsv(VALID);
    if (!whole.ok) throw new Error(whole.error.message);
    fc.assert(
      fc.property(fc.integer({ min: 0, max: VALID_BYTES.length }), (cut) => {
        const r = ingestCsv(VALID_BYTES.subarray(0, cut));
        if (!isOutcome(r)) return false;
        if (!r.ok) return true;
        const n = r.value.timeS.length;
        return (
          n <= whole.value.timeS.length &&
          r.value.crankRadS.every((v, i) => v === whole.value.crankRadS[i])
        );
      }),
      { numRuns: 300 },
    );
  });
  it("on random chunk boundaries, with the same result as one piece", () => {
    const whole = ingestCsv(VALID);
    fc.assert(
      fc.property(
        fc.uniqueArray(fc.integer({ min: 1, max: VALID_BYTES.length - 1 }), { maxLength: 20 }),
        (cuts) => {
          const ing = createIngester();
          let s = 0;
          for (const c of [...cuts].sort((a, b) => a - b)) {
            ing.push(VALID_BYTES.subarray(s, c));
            s = c;
          }
          ing.push(VALID_BYTES.subarray(s));
          const r = ing.finish();
          return (
            r.ok &&
            whole.ok &&
            r.value.gearboxRadS.every((v, i) => v === whole.value.gearboxRadS[i])
          );
        },
      ),
      { numRuns: 100 },
    );
  });
});

// A decimal number as loggers write it: sign, integer digits (leading zeros too), fraction,
// sometimes an exponent or more than 15 significant digits (beyond the scanner's exact range).
const decimalText = fc
  .tuple(
    fc.constantFrom("", "-", "+"),
    fc.stringMatching(/^[0-9]{1,12}$/),
    fc.option(fc.stringMatching(/^[0-9]{0,14}$/), { nil: undefined }),
    fc.option(fc.integer({ min: -30, max: 30 }), { nil: undefined }),
    fc.boolean(),
  )
  .map(([sign, int, frac, exp, quote]) => {
    const body = `${sign}${int}${frac !== undefined ? `.${frac}` : ""}${exp !== undefined ? `e${exp}` : ""}`;
    return quote ? `"${body}"` : body;
  });

describe("the byte scanner agrees with papaparse + Number()", () => {
  it("on random decimal fields in the extra columns, exactly", () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(decimalText, decimalText), { minLength: 1, maxLength: 40 }),
        (pairs) => {
          const lines = [
            HEADER,
            ...pairs.map(([a, b], i) => `${(i / 1000).toFixed(3)},800,800,${a},${b}`),
          ];
          const text = lines.join("\n");
          const r = ingestCsv(text);
          if (!r.ok) return false;
          const ref = Papa.parse<string[]>(text, { delimiter: "," }).data.slice(1);
          return ref.every(
            (row, i) =>
              Object.is(r.value.extra.x1?.[i], Number(row[3])) &&
              Object.is(r.value.extra.x2?.[i], Number(row[4])),
          );
        },
      ),
      { numRuns: 300 },
    );
  });
  it("with a decimal comma and ';', against Number() of the field with '.'", () => {
    fc.assert(
      fc.property(fc.array(decimalText, { minLength: 1, maxLength: 40 }), (fields) => {
        const lines = [
          "time [s];crank [rpm];gearbox [rpm];x",
          ...fields.map((a, i) => `${i},5;800,5;800;${a.replace(".", ",")}`),
        ];
        const r = ingestCsv(lines.join("\n"), { decimal: "," });
        if (!r.ok) return false;
        return fields.every((a, i) => Object.is(r.value.extra.x?.[i], Number(a.replace(/"/g, ""))));
      }),
      { numRuns: 200 },
    );
  });
});
