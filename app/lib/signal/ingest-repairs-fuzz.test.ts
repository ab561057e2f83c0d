/**
 * Property tests of the repairs (fast-check, bounded runs): whatever holes a log has — empty
 * cells, non-finite words, rows removed, in random places and lengths — the ingest returns a
 * value, never throws, and a log it accepts keeps the DriveLog's promises: every value finite,
 * times strictly increasing, sections back to back over the arrays, and no interval inside a
 * section longer than the gap threshold (1.5 × the nominal interval, CheckOptions.gapFactor).
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RIPPLE, rippleCsv } from "../../../tests/support/ripple-csv.ts";
import { ingestCsv } from "./ingest.ts";

const N = 1200; // 0.6 s at 2 kHz
const hole = fc.record({
  at: fc.integer({ min: 0, max: N - 1 }),
  length: fc.integer({ min: 1, max: 60 }),
  kind: fc.constantFrom("empty-gearbox", "nan-crank", "drop-row", "empty-time"),
});

function withHoles(holes: { at: number; length: number; kind: string }[], jitter: number) {
  return rippleCsv(N / RIPPLE.fs, {
    jitter,
    edit: (i, l) => {
      const h = holes.find((x) => i >= x.at && i < x.at + x.length);
      if (!h) return l;
      const f = l.split(",");
      if (h.kind === "drop-row") return null;
      if (h.kind === "empty-gearbox") f[2] = "";
      if (h.kind === "nan-crank") f[1] = "NaN";
      if (h.kind === "empty-time") f[0] = "";
      return f.join(",");
    },
  });
}

describe("repairs keep the DriveLog's promises", () => {
  it("on random holes, with and without jitter", () => {
    let accepted = 0;
    fc.assert(
      fc.property(fc.array(hole, { maxLength: 6 }), fc.constantFrom(0, 0.1), (holes, jitter) => {
        const r = ingestCsv(withHoles(holes, jitter));
        if (!r.ok) {
          expect(r.error.code).toMatch(/^[a-z_]+$/);
          return;
        }
        accepted++;
        const { timeS, crankRadS, gearboxRadS } = r.value;
        const n = timeS.length;
        // Counted first and asserted once: an expect per sample made the property slow.
        let bad = 0;
        for (let i = 0; i < n; i++) {
          if (!Number.isFinite(crankRadS[i]!) || !Number.isFinite(gearboxRadS[i]!)) bad++;
          if (i > 0 && !(timeS[i]! > timeS[i - 1]!)) bad++;
        }
        expect(bad).toBe(0);
        const sections = r.value.sections ?? [{ startIndex: 0, endIndex: n }];
        expect(sections[0]!.startIndex).toBe(0);
        expect(sections[sections.length - 1]!.endIndex).toBe(n);
        const nominal = 1 / RIPPLE.fs;
        sections.forEach((s, k) => {
          if (k > 0) expect(s.startIndex).toBe(sections[k - 1]!.endIndex);
          let longest = 0;
          for (let i = s.startIndex + 1; i < s.endIndex; i++)
            longest = Math.max(longest, timeS[i]! - timeS[i - 1]!);
          expect(longest).toBeLessThanOrEqual(1.5 * nominal * (1 + 1e-6));
        });
        for (const rep of r.value.source.repairs ?? []) {
          expect(rep.count).toBeGreaterThan(0);
          expect(rep.rows.length).toBeGreaterThan(0);
          expect(rep.toS).toBeGreaterThanOrEqual(rep.fromS);
        }
      }),
      { numRuns: 60 },
    );
    // Holes of at most 60 rows in 1200 leave a log: the property is not passed vacuously.
    expect(accepted).toBeGreaterThan(50);
  });
});
