import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { expectedIsolationDb, IDLE_800 } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { pdfPages, squeezed, type PdfPages } from "../support/pdf-pages";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";
import {
  apiPerRole,
  getPdf,
  makeVehicle,
  sendJson,
  sha256Hex,
  uploadIdle,
  type BenchRole,
  type UploadedLog,
} from "../support/signoff-bed";
import type { ApiFetch } from "../support/trend-logs";
import type { ClaimCheck, SignoffJson, SignoffRecord } from "~/lib/domain/signoff";

// The evidence report through API v1 (issue 16, "Must show"), read back by an independent
// reader, Mozilla's pdf.js (tests/support/pdf-pages.ts): the proposal's report and the vehicle's
// draft are watermarked, the approved one is not; every page names the vehicle and damper
// variant and its page number; the summary gives each claimed target's verdict and margin; the
// traceability table gives every drive log's SHA-256, computed here from the bytes sent.
const testbed = await useJobTestbed("signoffpdf");
const { pool } = await import("~/lib/infra/db.server");
const { targetData } = await import("~/lib/data/targets.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");

const IDENTIFIER = "RPT-7";
const VARIANT = "Arc-2";

let server: Awaited<ReturnType<typeof startServer>>;
let api: Record<BenchRole, ApiFetch>;
let vehicleId: number;
let logs: UploadedLog[];
let signoff: SignoffJson;
let record: SignoffRecord;
let proposal: { bytes: Buffer; headers: Headers; pdf: PdfPages };

// The analytic idle log's isolation, −20·log10|H(r)| (Harris' Shock and Vibration Handbook
// ch. 30; Ogata, System Dynamics, eq. 9-14): 11.2 dB; targets 1 dB under and over it.
const formulaDb = expectedIsolationDb(IDLE_800);
const round2 = (x: number) => Math.round(x * 100) / 100;

beforeAll(async () => {
  let team: Awaited<ReturnType<typeof createTestTeam>>;
  [server, team] = await Promise.all([startServer(testbed.serverEnv), createTestTeam("Report")]);
  api = await apiPerRole(server.url, team);
  vehicleId = await makeVehicle(api.engineer, IDENTIFIER);
  const page = await HttpClient.signedIn(server.url, team.accounts.engineer.email, TEST_PASSWORD);
  await page.get(`/vehicles/${vehicleId}`);
  const targetForms: Record<string, string>[] = [
    { kind: "isolation", name: "Idle isolation", minDb: String(round2(formulaDb - 1)) },
    { kind: "isolation", name: "Idle isolation, stretch", minDb: String(round2(formulaDb + 1)) },
    { kind: "rattle", name: "Idle rattle", maxRadS2: "400" },
  ];
  for (const fields of targetForms) {
    const r = await page.post(`/vehicles/${vehicleId}`, {
      intent: "create-target",
      rpmFrom: "775",
      rpmTo: "825",
      ...fields,
    });
    if (r.status !== 200) throw new Error(`target ${fields.name}: ${r.status}`);
  }
  const targets = await targetData(team.id).list(vehicleId);
  logs = [
    await uploadIdle(api.technician, vehicleId, "idle-warm.csv", VARIANT),
    await uploadIdle(api.technician, vehicleId, "idle-hot.csv", VARIANT, { crankAmpRpm: 12 }),
  ];
  const stretch = targets.find((t) => t.name === "Idle isolation, stretch")!.id;
  const made = await sendJson<{ signoff: SignoffJson }>(
    api.engineer,
    "POST",
    `/api/v1/vehicles/${vehicleId}/signoffs`,
    {
      damperVariant: VARIANT,
      claims: targets.map((t) => ({ targetId: t.id, logIds: logs.map((l) => l.id) })),
      note: "Warm and hot idle in neutral.",
      deviations: [{ targetId: stretch, reason: "The stretch goal is for the next programme." }],
    },
  );
  if (made.status !== 201) throw new Error(`proposal: ${made.status} ${JSON.stringify(made.body)}`);
  signoff = made.body.signoff;
  record = (
    await sendJson<{ record: SignoffRecord }>(api.viewer, "GET", `/api/v1/signoffs/${signoff.id}`)
  ).body.record;
  const got = await getPdf(api.viewer, `/api/v1/signoffs/${signoff.id}/report.pdf`);
  expect(got.status).toBe(200);
  proposal = { ...got, pdf: await pdfPages(got.bytes) };
}, 180_000);
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

/** "+1.0 dB", "-1.0 dB", "+352 rad/s²": one decimal in dB, whole rad/s² (the app's rounding). */
function marginWords(margin: number, unit: ClaimCheck["unit"]): string {
  const digits = unit === "dB" ? 1 : unit === "°" ? 1 : 0;
  const text = Math.abs(margin).toFixed(digits);
  const sign = Number(text) === 0 ? "" : margin < 0 ? "-" : "+";
  return `${sign}${text} ${unit}`;
}

/** What every evidence report must show, whatever its state. */
function expectFrame(pdf: PdfPages, logCount: number) {
  // A4 portrait (ISO 216: 210 × 297 mm = 595.28 × 841.89 pt).
  expect(pdf.size.width).toBeCloseTo(595.28, 0);
  expect(pdf.size.height).toBeCloseTo(841.89, 0);
  // A summary, a page per drive log, and the traceability, approvals and cautions.
  expect(pdf.count).toBeGreaterThanOrEqual(2 + logCount);
  pdf.pages.forEach((text, i) => {
    expect(text, `page ${i + 1}`).toContain(IDENTIFIER);
    expect(text, `page ${i + 1}`).toContain(VARIANT);
    expect(text, `page ${i + 1}`).toContain(`Page ${i + 1} of ${pdf.count}`);
  });
  const all = squeezed(pdf.pages.join(" "));
  for (const log of logs) expect(all, log.fileName).toContain(log.sha256);
}

const watermarked = (pdf: PdfPages) => pdf.pages.map((text) => /\bDRAFT\b/.test(text));

describe("the proposal's evidence report", () => {
  it("is a PDF shown inline with its file name, never cached", () => {
    expect(proposal.bytes.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    expect(proposal.headers.get("content-type")).toBe("application/pdf");
    expect(proposal.headers.get("content-disposition")).toMatch(
      new RegExp(`^inline; filename="${IDENTIFIER}-${VARIANT}-signoff-${signoff.id}-draft\\.pdf"`),
    );
    expect(proposal.headers.get("cache-control")).toBe("no-store");
    expect(proposal.headers.get("etag")).toBeNull();
  });

  it("names the vehicle, the variant and the page number on every page, and every drive log's SHA-256", () => {
    expectFrame(proposal.pdf, logs.length);
  });

  it("gives each claimed target's verdict and least margin, and each drive log's", () => {
    const summary = proposal.pdf.pages[0]!;
    expect(record.claims).toHaveLength(3);
    for (const claim of record.claims) {
      expect(summary).toContain(claim.targetName);
      expect(claim.margin).not.toBeNull();
      expect(summary, claim.targetName).toContain(marginWords(claim.margin!, claim.unit));
      for (const l of claim.logs)
        expect(squeezed(summary)).toContain(
          squeezed(
            `${l.fileName}: ${l.status === "pass" ? "Pass" : "Fail"}, ${marginWords(l.margin!, claim.unit)}`,
          ),
        );
    }
    // The verdicts themselves, against the formula (±0.3 dB, the pipeline's tolerance).
    const isolation = record.claims.find((c) => c.targetName === "Idle isolation")!;
    const stretch = record.claims.find((c) => c.targetName === "Idle isolation, stretch")!;
    expect(isolation.status).toBe("pass");
    expect(stretch.status).toBe("fail");
    expect(Math.abs(isolation.margin! - 1)).toBeLessThan(0.3);
    expect(Math.abs(stretch.margin! + 1)).toBeLessThan(0.3);
    expect(summary).toMatch(/Pass/);
    expect(summary).toMatch(/Fail/);
    expect(summary).toContain("The stretch goal is for the next programme.");
  });

  it("carries the draft watermark on every page", () => {
    expect(watermarked(proposal.pdf)).toEqual(proposal.pdf.pages.map(() => true));
  });
});

describe("the vehicle's draft report of its current state", () => {
  it("is watermarked, names the vehicle and variant on every page and every drive log's SHA-256", async () => {
    const got = await getPdf(
      api.viewer,
      `/api/v1/vehicles/${vehicleId}/report.pdf?damperVariant=${encodeURIComponent(VARIANT)}`,
    );
    expect(got.status).toBe(200);
    expect(got.headers.get("content-type")).toBe("application/pdf");
    expect(got.headers.get("content-disposition")).toMatch(/^inline; filename="RPT-7-Arc-2-draft-/);
    expect(got.headers.get("cache-control")).toBe("no-store");
    const pdf = await pdfPages(got.bytes);
    expectFrame(pdf, logs.length);
    expect(watermarked(pdf)).toEqual(pdf.pages.map(() => true));
    // Every target of the vehicle, judged over the variant's drive logs.
    for (const name of ["Idle isolation", "Idle isolation, stretch", "Idle rattle"])
      expect(pdf.pages[0]).toContain(name);
  });

  it("refuses an empty damper variant (400) and another team's vehicle (404)", async () => {
    const empty = await sendJson(
      api.viewer,
      "GET",
      `/api/v1/vehicles/${vehicleId}/report.pdf?damperVariant=`,
    );
    expect(empty.status).toBe(400);
    const other = await createTestTeam("Report elsewhere");
    const theirs = await apiPerRole(server.url, other);
    expect((await theirs.admin(`/api/v1/vehicles/${vehicleId}/report.pdf`)).status).toBe(404);
    expect((await theirs.admin(`/api/v1/signoffs/${signoff.id}/report.pdf`)).status).toBe(404);
  });
});

describe("the approved evidence report", () => {
  let approved: { bytes: Buffer; headers: Headers; pdf: PdfPages };
  let digest: string;

  beforeAll(async () => {
    const r = await sendJson<{ signoff: SignoffJson }>(
      api.admin,
      "POST",
      `/api/v1/signoffs/${signoff.id}/approve`,
      { comment: "Released for the pilot build." },
    );
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    digest = r.body.signoff.digest!;
    const got = await getPdf(api.viewer, `/api/v1/signoffs/${signoff.id}/report.pdf`);
    expect(got.status).toBe(200);
    approved = { ...got, pdf: await pdfPages(got.bytes) };
  });

  it("has no watermark, and still the frame: vehicle, variant, page numbers, SHA-256 of every drive log", () => {
    expectFrame(approved.pdf, logs.length);
    expect(watermarked(approved.pdf)).toEqual(approved.pdf.pages.map(() => false));
  });

  it("shows the digest and the approval", () => {
    const all = approved.pdf.pages.join(" ");
    expect(squeezed(all)).toContain(digest);
    expect(all).toContain("Released for the pilot build.");
  });

  it("is stored: the same bytes on every request, its SHA-256 as ETag, 304 when unchanged", async () => {
    expect(approved.headers.get("etag")).toBe(`"${sha256Hex(approved.bytes)}"`);
    expect(approved.headers.get("content-disposition")).toMatch(
      new RegExp(`^inline; filename="${IDENTIFIER}-${VARIANT}-signoff-${signoff.id}\\.pdf"`),
    );
    const again = await getPdf(api.engineer, `/api/v1/signoffs/${signoff.id}/report.pdf`);
    expect(again.bytes.equals(approved.bytes)).toBe(true);
    const cached = await api.viewer(`/api/v1/signoffs/${signoff.id}/report.pdf`, {
      headers: { "If-None-Match": approved.headers.get("etag")! },
    });
    expect(cached.status).toBe(304);
    expect((await cached.arrayBuffer()).byteLength).toBe(0);
  });
});
