/**
 * The evidence report read back by an independent reader: pdfjs-dist, Mozilla's PDF reader
 * (npm), through tests/support/pdf-reader.ts. The models are built from real analyses of
 * analytic drive logs (tests/support/report-fixture.ts: the two-mass transfer function of
 * Harris ch. 30 / Ogata eq. 9-14 through the app's analyseDriveLog, judged by evaluateTargets and
 * checkClaims). Expected texts are written here from the model's numbers, not copied from the
 * renderer.
 */
import { createRequire } from "node:module";
import { beforeAll, describe, expect, it } from "vitest";
import { drawEvidenceReport, renderEvidenceReport } from "./evidence-report";
import type { ReportModel } from "./report-model";
import {
  fixtureLogs,
  fixtureModel,
  manyLogs,
  type FixtureLog,
} from "../../../tests/support/report-fixture";
import { readPdf, type ReadPdf } from "../../../tests/support/pdf-reader";

let logs: FixtureLog[];
let approved: ReportModel;
let approvedPdf: Buffer;
let approvedRead: ReadPdf;
let draft: ReportModel;
let draftRead: ReadPdf;

const DIGEST = "5f0c3e9a1b7d24c68e0f1a2b3c4d5e6f708192a3b4c5d6e7f8091a2b3c4d5e6f7";

beforeAll(async () => {
  logs = fixtureLogs();
  approved = fixtureModel({
    logs: logs.slice(0, 2),
    claims: [
      { targetId: 11, logs: [0] },
      { targetId: 12, logs: [1] },
      { targetId: 13, logs: [1] },
      { targetId: 14, logs: [1] },
      { targetId: 15, logs: [0] },
    ],
    deviations: [
      {
        targetId: 15,
        reason: "Drive-away boom below 1000 rpm accepted by the programme board for this build.",
      },
    ],
    digest: DIGEST,
    note: "Released for the Kestrel D4 build phase 2.",
    steps: [
      { step: "proposed", by: "Ines Engineer", at: "2026-11-05T10:00:00Z", text: "Proposed." },
      { step: "approved", by: "Ada Admin", at: "2026-11-05T15:30:00Z", text: "Agreed." },
    ],
  });
  approvedPdf = await renderEvidenceReport(approved);
  approvedRead = await readPdf(approvedPdf);
  draft = fixtureModel({
    logs,
    state: "current state",
    draft: true,
    signoffId: null,
    amplitudeUnit: "rad/s",
  });
  draftRead = await readPdf(await renderEvidenceReport(draft));
}, 120_000);

/** The margin as the report must write it: sign, one decimal (dB, °) or whole (rad/s²), unit. */
function expectedMargin(margin: number, unit: string): string {
  const digits = unit === "rad/s²" ? 0 : 1;
  const abs = Math.abs(margin).toFixed(digits);
  const zero = Number(abs) === 0;
  const sign = zero ? "" : margin < 0 ? "−" : "+"; // U+2212 minus, as the pages write it
  return unit === "°" ? `${sign}${abs}°` : `${sign}${abs} ${unit}`;
}

describe("evidence report read by pdfjs-dist (Mozilla's independent PDF reader)", () => {
  it("has the pages the layout promises: summary, two per drive log, traceability, approvals and cautions", () => {
    // docs/evidence-report.md: 1 + 2 × 2 + 1 + 1 for the approved fixture (2 drive logs).
    expect(approvedRead.pages).toHaveLength(7);
    // Each drive log starts a page of its own and takes two; the traceability follows them;
    // approvals and cautions close the report on a page of their own. The draft's summary (every
    // target over three drive logs) may run onto a second page.
    const starts = (read: ReadPdf, heading: string) =>
      read.pages.findIndex((p) => p.items.some((x) => x.startsWith(heading))) + 1;
    for (const [read, n] of [
      [approvedRead, 2],
      [draftRead, 3],
    ] as const) {
      const summaryPages = starts(read, `Drive log 1 of ${n}:`) - 1;
      expect(summaryPages).toBeGreaterThanOrEqual(1);
      for (let i = 1; i <= n; i++)
        expect(starts(read, `Drive log ${i} of ${n}:`)).toBe(summaryPages + 2 * (i - 1) + 1);
      expect(starts(read, "Traceability")).toBe(summaryPages + 2 * n + 1);
      expect(starts(read, "Approvals and history")).toBe(read.pages.length);
    }
    expect(starts(approvedRead, "Traceability")).toBe(6);
  });

  it("names the vehicle, the damper variant and 'Page i of n' on every page", () => {
    for (const read of [approvedRead, draftRead]) {
      const n = read.pages.length;
      read.pages.forEach((page, i) => {
        expect(page.text).toContain("KST-D4");
        expect(page.text).toContain("Kestrel estate 2.0 diesel");
        expect(page.text).toContain("Damper variant: DMF-B2");
        expect(page.text).toContain("Programme: Kestrel driveline NVH");
        expect(page.items).toContain(`Page ${i + 1} of ${n}`);
      });
    }
  });

  it("writes the state in words in every header, and the sign-off and digest in every footer", () => {
    for (const page of approvedRead.pages) {
      expect(page.items).toContain("Approved");
      expect(page.text).toContain("Sign-off 42");
      expect(page.text).toContain(`Digest ${DIGEST.slice(0, 12)}`);
    }
    for (const page of draftRead.pages) expect(page.text).toContain("Current state");
  });

  it("gives each claimed target its verdict in words and its least margin with the unit", () => {
    const summary = approvedRead.pages[0]!;
    expect(summary.text).toContain("Sign-off of damper variant DMF-B2");
    for (const claim of approved.claims) {
      expect(summary.text).toContain(claim.targetName.split(" ")[0]!);
      expect(claim.margin).not.toBeNull();
      expect(summary.items).toContain(expectedMargin(claim.margin!, claim.unit));
      for (const log of claim.logs) expect(summary.text).toContain(log.fileName);
    }
    const count = (s: string) => summary.items.filter((x) => x === s).length;
    expect(count("Pass")).toBe(approved.claims.filter((c) => c.status === "pass").length);
    expect(count("Fail")).toBe(1);
    // "Deviation accepted" sits under "Fail" in the verdict cell (it may wrap there).
    expect(summary.text).toContain("Fail Deviation accepted");
    expect(summary.text).toContain(
      "deviation accepted: Drive-away boom below 1000 rpm accepted by the programme board for this build.",
    );
    expect(summary.items).toContain(DIGEST);
    expect(summary.text).toContain("Released for the Kestrel D4 build phase 2.");
  });

  it("states the draft's verdicts over every drive log, and says it has no digest", () => {
    const summary = draftRead.pages[0]!;
    expect(summary.text).toContain("Evidence report: damper variant DMF-B2");
    // The soft-spring log fails the cruise isolation target (resonance at 1200 rpm).
    const cruise = draft.claims.find((c) => c.targetId === 11)!;
    expect(cruise.status).toBe("fail");
    expect(summary.items).toContain(expectedMargin(cruise.margin!, "dB"));
    const summaryText = draftRead.pages
      .slice(0, 2)
      .map((p) => p.text)
      .join(" ");
    expect(summaryText).toContain("A draft has no digest");
  });

  it("carries every drive log's SHA-256 (64 hex) as one string, and its result checksum", () => {
    const all = approvedRead.pages.flatMap((p) => p.items);
    for (const { log } of approved.logs) {
      expect(log.sha256).toMatch(/^[0-9a-f]{64}$/);
      expect(all.some((s) => s.includes(log.sha256))).toBe(true);
      expect(all.some((s) => s.includes(log.analysis.resultSha256))).toBe(true);
    }
  });

  it("watermarks every page of a draft DRAFT, and no page of an approved sign-off", () => {
    for (const page of draftRead.pages) expect(page.items).toContain("DRAFT");
    for (const page of approvedRead.pages) expect(page.text).not.toContain("DRAFT");
  });

  it("draws the charts as vector paths: path operators on every drive-log page, no image anywhere", () => {
    for (const read of [approvedRead, draftRead]) {
      for (const page of read.pages) expect(page.ops.filter((op) => /image/i.test(op))).toEqual([]);
      const chartPages = read.pages.filter((p) => p.text.includes("Engine speed, rpm"));
      expect(chartPages.length).toBeGreaterThanOrEqual(read === approvedRead ? 2 : 3);
      for (const page of chartPages) expect(page.ops).toContain("constructPath");
    }
  });

  it("puts units on every axis and every column of the events table", () => {
    // Table headers wrap at hyphens and spaces: read them with the line breaks closed up.
    const text = approvedRead.pages
      .map((p) => p.text)
      .join(" ")
      .replace(/- /g, "-");
    expect(text).toContain("Isolation, dB");
    expect(text).toContain("Amplitude (0-peak), rpm");
    expect(draftRead.pages.map((p) => p.text).join(" ")).toContain("Amplitude (0-peak), rad/s");
    expect(text).toContain("Gearbox-input angular acceleration, rad/s²");
    for (const header of ["From–to, s", "Resonance, rpm", "amplification, dB", "resonance, s"])
      expect(text).toContain(header);
    expect(text).toContain("Twist peak-to-peak, °");
  });

  it("shows the rattle check against the vehicle's limit and the stop event's figures", () => {
    const result = logs[1]!.result;
    const text = approvedRead.pages.map((p) => p.text).join(" ");
    expect(result.idle).not.toBeNull();
    const value = Math.max(
      result.idle!.gearboxAngAccelRadS2,
      result.idle!.gearboxAngAccelPeakRadS2,
    );
    expect(text).toContain(`${Math.round(value)} rad/s²`);
    expect(text).toContain("Limit 500 rad/s²");
    const stop = result.events!.find((e) => e.kind === "stop")!;
    expect(text).toContain(stop.peakAmplificationDb!.toFixed(1));
    expect(text).toContain(stop.twistPeakToPeakDeg.toFixed(1));
  });

  it("records Title, Author and the model's generation time as the creation date", () => {
    expect(approvedRead.info.Author).toBe("Twistlog");
    expect(String(approvedRead.info.Title)).toContain("Sign-off of damper variant DMF-B2");
    // PDF date string (ISO 32000-1 §7.9.4): D:YYYYMMDDHHmmSS, here in UTC.
    expect(String(approvedRead.info.CreationDate)).toMatch(/^D:20261106070000/);
  });

  it("renders one model to the same bytes twice", async () => {
    const again = await renderEvidenceReport(approved);
    expect(again.equals(approvedPdf)).toBe(true);
  });
});

describe("evidence report: missing parts, long texts, many drive logs", () => {
  it("says in a sentence what a drive log lacks: no isolation, no order curve, no idle, no events", async () => {
    const bare: FixtureLog = {
      ...logs[0]!,
      result: {
        ...logs[0]!.result,
        isolation: [],
        orderCurves: [],
        idle: null,
        events: undefined,
        resonance: null,
      },
    };
    const read = await readPdf(
      await renderEvidenceReport(
        fixtureModel({ logs: [bare], claims: [{ targetId: 11, logs: [0] }] }),
      ),
    );
    const text = read.pages.map((p) => p.text).join(" ");
    expect(text).toContain("This drive log has no isolation bins");
    expect(text).toContain("No order curve");
    expect(text).toContain("No idle segment in this drive log, so no rattle check.");
    expect(text).toContain("made before start and stop events were measured");
    expect(text).toContain("Not covered");
  });

  it("wraps a 4000-character note and 1000-character reasons, and keeps every page numbered", async () => {
    const words = "the boom at drive-away was judged on the vehicle by two engineers ";
    const note = (words.repeat(70).slice(0, 3990) + " END-OF-NOTE").trim();
    const model = fixtureModel({
      logs: logs.slice(0, 1),
      claims: [{ targetId: 15, logs: [0] }],
      deviations: [
        { targetId: 15, reason: (words.repeat(20).slice(0, 980) + " END-OF-REASON").trim() },
      ],
      note,
    });
    const read = await readPdf(await renderEvidenceReport(model));
    const text = read.pages.map((p) => p.text).join(" ");
    expect(text).toContain("END-OF-NOTE");
    expect(text).toContain("END-OF-REASON");
    read.pages.forEach((p, i) =>
      expect(p.items).toContain(`Page ${i + 1} of ${read.pages.length}`),
    );
    expect(read.pages.length).toBeGreaterThan(1 + 2 + 1 + 1);
  });

  it("takes 22 drive logs: a section per log, every SHA-256 present, numbered to the end", async () => {
    const many = manyLogs(logs, 22);
    const model = fixtureModel({ logs: many, state: "proposed", draft: true });
    const read = await readPdf(await renderEvidenceReport(model));
    const all = read.pages.flatMap((p) => p.items);
    for (const l of many) expect(all.some((s) => s.includes(l.sha256))).toBe(true);
    for (let i = 1; i <= 22; i++)
      expect(read.pages.some((p) => p.text.includes(`Drive log ${i} of 22:`))).toBe(true);
    expect(read.pages.at(-1)!.items).toContain(`Page ${read.pages.length} of ${read.pages.length}`);
    for (const page of read.pages) {
      expect(page.items).toContain("DRAFT");
      expect(page.items).toContain("Awaiting approval");
    }
  });
});

describe("glyph coverage (fontkit reading the @fontsource WOFF files)", () => {
  it("every run the report draws is covered by the font it is drawn in", async () => {
    const require = createRequire(import.meta.url);
    const fontkit = createRequire(require.resolve("pdfkit"))("fontkit") as {
      create(b: Buffer): { hasGlyphForCodePoint(cp: number): boolean };
    };
    const { readFileSync } = await import("node:fs");
    const file = (name: string) =>
      fontkit.create(readFileSync(require.resolve(`@fontsource/inter/files/${name}.woff`)));
    const fonts: Record<string, { hasGlyphForCodePoint(cp: number): boolean }> = {
      Inter: file("inter-latin-400-normal"),
      "Inter-ext": file("inter-latin-ext-400-normal"),
      "Inter-Semibold": file("inter-latin-600-normal"),
      "Inter-Semibold-ext": file("inter-latin-ext-600-normal"),
    };
    const model = fixtureModel({
      logs: logs.slice(0, 2),
      claims: [{ targetId: 15, logs: [0] }],
      deviations: [{ targetId: 15, reason: "Accepted: boom ≥ 3 dB → see Łódź notes, 漢字 ω." }],
      note: "Straße, Łukasz Żółć, ½ ≤ ¾.",
      draft: true,
    });
    const runs: { text: string; font: string }[] = [];
    const bytes = await drawEvidenceReport(model, (text, font) => runs.push({ text, font }));
    expect(runs.length).toBeGreaterThan(200);
    const missing = runs.flatMap(({ text, font }) =>
      [...text]
        .filter((ch) => ch !== "\n" && !fonts[font]!.hasGlyphForCodePoint(ch.codePointAt(0)!))
        .map((ch) => `${JSON.stringify(ch)} in ${font}: ${text}`),
    );
    expect(missing).toEqual([]);
    // The substitutions are visible in the text a reader extracts.
    const text = (await readPdf(bytes)).pages.map((p) => p.text).join(" ");
    expect(text).toContain(">= 3 dB -> see");
    // pdfjs puts a space where the font changes (latin to latin-ext): compare without spaces.
    const squeezed = text.replace(/\s+/g, "");
    expect(squeezed).toContain("ŁukaszŻółć");
    expect(squeezed).toContain("??omega");
  });
});
